/**
 * What the design check and the fab package read back from a finished run's stored artifacts (drc.json and
 * the files themselves); decoding the layout arrays is left to the worker thread of layout-jobs.ts.
 */
import { Readable } from 'node:stream';
import type { RunDesignCheck } from '../../../shared/schemas/fab';
import type { AppConfig } from '../../config';
import { AppError } from '../../lib/app-error';
import { findArtifact } from '../runs/run-artifacts';
import { RunArtifactChunkModel } from '../runs/run.model';
import type { RunModel } from '../runs/run.model';
import { UserModel } from '../users/user.model';
import { ExportOverrideModel } from './fab.model';
import { recheckDesignRules } from './layout-jobs';
import type { StoredDrc } from './layout-task';
import { runStatusPhrase } from '../../../shared/display-names';

/** Yields an artifact's stored chunks in order, one in memory at a time. */
export async function* artifactChunks(artifactId: number): AsyncGenerator<Buffer> {
  const chunks = await RunArtifactChunkModel.findAll({ where: { artifactId }, attributes: ['id'], order: [['seq', 'ASC']] });
  for (const { id } of chunks) {
    const chunk = await RunArtifactChunkModel.findByPk(id, { attributes: ['bytes'] });
    if (!chunk) throw new Error(`artifact chunk ${id} disappeared while reading`);
    yield chunk.bytes;
  }
}

export function artifactStream(artifactId: number): Readable {
  return Readable.from(artifactChunks(artifactId), { objectMode: false });
}

/** The whole artifact `artifactId` in one buffer (arrays and small records only); empty when it is gone. */
export async function readArtifactById(artifactId: number): Promise<Buffer> {
  const parts: Buffer[] = [];
  for await (const chunk of artifactChunks(artifactId)) parts.push(chunk);
  return Buffer.concat(parts);
}

/**
 * The whole artifact in a buffer of its own of `size` bytes (its recorded size), filled chunk by chunk: the
 * artifact's bytes once and one chunk more, never a second copy, and transferable to a worker thread. Empty when
 * the stored chunks do not add up to `size` (the files changed while being read).
 */
export async function readArtifactOwned(artifactId: number, size: number): Promise<Uint8Array> {
  const out = new Uint8Array(size);
  let at = 0;
  for await (const chunk of artifactChunks(artifactId)) {
    if (at + chunk.length > size) return new Uint8Array(0);
    out.set(chunk, at);
    at += chunk.length;
  }
  return at === size ? out : new Uint8Array(0);
}

/** The whole artifact in one buffer (arrays and small records only), or null when the run lacks it. */
export async function readArtifact(runId: number, name: string): Promise<Buffer | null> {
  const artifact = await findArtifact(runId, name);
  return artifact ? readArtifactById(artifact.id) : null;
}

export function requireSucceeded(run: RunModel): void {
  if (run.status !== 'succeeded') {
    throw new AppError(409, `Run ${run.id} is ${runStatusPhrase(run.status)}; only a finished run has a layout to show or export`);
  }
  if (run.filesDeletedAt) {
    throw new AppError(409, `The files of run ${run.id} were deleted; start the revision again to lay it out, check it or export it`);
  }
}

/** drc.json of the run; for a run from before drc.json existed, the check runs again on a worker thread. */
async function storedDrc(config: AppConfig, run: RunModel): Promise<StoredDrc> {
  const bytes = await readArtifact(run.id, 'drc.json');
  if (bytes) return JSON.parse(bytes.toString('utf8')) as StoredDrc;
  return recheckDesignRules(config, run);
}

export async function listOverrides(runId: number) {
  const rows = await ExportOverrideModel.findAll({
    where: { runId },
    include: [{ model: UserModel, as: 'user', attributes: ['id', 'name'] }],
    order: [['at', 'ASC'], ['id', 'ASC']],
  });
  return rows;
}

type CheckWithOverrides = RunDesignCheck & { latestOverrideId: number | null };

/** The run's design-rule result with the owners' overrides; export is allowed when clean or overridden. */
export async function designCheckOf(config: AppConfig, run: RunModel): Promise<CheckWithOverrides> {
  requireSucceeded(run);
  return withOverrides(run.id, await storedDrc(config, run));
}

/** A design-rule result already read, with the run's overrides as they stand now. */
export async function withOverrides(runId: number, drc: StoredDrc): Promise<CheckWithOverrides> {
  const overrides = await listOverrides(runId);
  const latest = overrides.at(-1) ?? null;
  return {
    rules: drc.rules,
    counts: drc.counts,
    total: drc.total,
    truncated: drc.truncated,
    closestGapNm: drc.closestGapNm,
    violations: drc.violations,
    overrides: overrides.map((o) => ({ id: o.id, reason: o.reason, at: o.at.toISOString(), by: o.user ? { id: o.user.id, name: o.user.name } : null })),
    exportAllowed: drc.total === 0 || latest !== null,
    latestOverrideId: latest?.id ?? null,
  };
}
