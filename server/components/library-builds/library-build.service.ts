/**
 * Library builds of a project: the cost estimate (a formula, no RCWA on the request thread), starting a build
 * on the run workers under the run quotas, its progress and result, and cancelling it. A personal build (its
 * library the requester's own) is seen by the person who started it only, as the personal library itself.
 */
import { availableParallelism } from 'node:os';
import { Op } from 'sequelize';
import { LibrarySpecError, libraryName, parseLibrarySpec, specDiffraction, specSource, type ResolvedSpec } from '../../../shared/optics/library-builder';
import type { LibraryBuild, LibraryBuildEstimate, LibraryBuildRequest, LibraryBuildResult } from '../../../shared/schemas/library-builds';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { withRunSlot } from '../quotas/quota.service';
import { parallelWithinRuns } from '../runs/run-executor';
import { UserModel } from '../users/user.model';
import { buildLanes, convergenceLadder, convergenceSizeIndices, estimateBuildSeconds, PER_ATOM_FORMULA, sectorSize } from './library-build-cost';
import { LibraryBuildModel } from './library-build.model';

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);
const createdBy = { model: UserModel, as: 'createdBy', attributes: ['id', 'name'] };
const NAME_MAX = 120;
/** Longest source line an atom library keeps (atom_libraries.source). */
const SOURCE_MAX = 500;
const MATERIAL_NAME_MAX = 60;

function toBuild(build: LibraryBuildModel): LibraryBuild {
  return {
    id: build.id,
    projectId: build.projectId,
    scope: build.scope,
    name: build.name,
    status: build.status,
    progress: build.progress ?? null,
    error: build.error ?? null,
    libraryId: build.libraryId ?? null,
    spec: build.spec,
    estimateSeconds: build.estimateSeconds,
    warnings: build.warnings,
    createdBy: build.createdBy ? { id: build.createdBy.id, name: build.createdBy.name } : { id: 0, name: 'a removed account' },
    createdAt: build.createdAt.toISOString(),
    startedAt: iso(build.startedAt),
    finishedAt: iso(build.finishedAt),
  };
}

/** The spec checked by the builder's own parser; 400 naming every field at fault (`spec.<field>`). */
function resolveSpec(ctx: AppContext, raw: unknown): ResolvedSpec {
  let resolved: ResolvedSpec;
  try {
    resolved = parseLibrarySpec(raw, { nkLimits: { maxRows: ctx.config.NK_TABLE_MAX_ROWS, maxLineChars: ctx.config.NK_TABLE_MAX_LINE_CHARS } });
  } catch (error) {
    if (!(error instanceof LibrarySpecError)) throw error;
    const details: Record<string, string> = {};
    for (const p of error.problems) {
      const key = p.field === 'spec' ? 'spec' : `spec.${p.field}`;
      details[key] = details[key] ? `${details[key]}; ${p.message}` : p.message;
    }
    const count = error.problems.length;
    throw new AppError(400, `The library spec has ${count === 1 ? 'a problem' : `${count} problems`} — ${error.message}`, details);
  }
  const problem = (field: string, message: string) => new AppError(400, `The library spec has a problem — ${field}: ${message}`, { [`spec.${field}`]: message });
  if (resolved.spec.name.length > NAME_MAX) throw problem('name', `at most ${NAME_MAX} characters`);
  // The stored library keeps its source line (RCWA, harmonics, materials, λ, P, height) in SOURCE_MAX characters.
  for (const field of ['pillar', 'substrate', 'superstrate'] as const) {
    const material = resolved.spec[field];
    if (typeof material === 'object' && (material.name?.length ?? 0) > MATERIAL_NAME_MAX) throw problem(`${field}.name`, `at most ${MATERIAL_NAME_MAX} characters`);
  }
  const source = specSource(resolved);
  if (source.length > SOURCE_MAX) throw problem('pillar', `the materials' names make the library's source line ${source.length} characters long, more than ${SOURCE_MAX}: shorten them`);
  return resolved;
}

/**
 * Fewest atoms a library may hold: the phase-coverage check of every atom library (checkAtomLibrary, 2π in
 * eight steps per axis) refuses fewer, for an upload as for a build.
 */
const MIN_LIBRARY_ATOMS = 8;
const fewAtoms = (r: ResolvedSpec) => {
  const n = r.sizes.length;
  return `the sweep holds ${n} × ${n} = ${n * n} atoms; an atom library needs at least ${MIN_LIBRARY_ATOMS} to cover 2π in eight steps: take a smaller step or a smaller smallest feature`;
};

/** Threads one build gets on this installation's workers (as runs get helper threads: RUN_HELPER_THREADS). */
function lanesOf(ctx: AppContext): number {
  const threads = ctx.runQueue.state().threads || ctx.config.RUN_WORKERS || availableParallelism();
  return buildLanes(ctx.config.RUN_HELPER_THREADS ?? parallelWithinRuns(threads));
}

/** What a resolved spec will cost, with the lattice-diffraction warnings and a warning past the time limit. */
function estimateOf(ctx: AppContext, r: ResolvedSpec): LibraryBuildEstimate {
  const n = r.sizes.length;
  const atoms = n * n;
  const h = r.spec.harmonics;
  const lanes = lanesOf(ctx);
  const { secondsPerAtom, seconds } = estimateBuildSeconds(atoms, n, h, lanes);
  const ladder = convergenceLadder(h);
  const pillars = convergenceSizeIndices(n).length;
  const basis =
    `formula, no atom computed: ${PER_ATOM_FORMULA} with S = ${sectorSize(h)} (the size of each symmetry sector's ` +
    `eigenproblem at ${h}×${h} harmonics), fitted to times measured by bench/rcwa.ts on a 2-core machine; ${atoms} atoms on ` +
    `${lanes === 1 ? 'one thread' : `${lanes} threads`}${ladder.length > 1 ? `, then the convergence report of ${pillars} pillar${pillars === 1 ? '' : 's'} at ${ladder.slice(0, -1).join(', ')} harmonics` : ''}`;
  const warnings = specDiffraction(r).map((d) => d.message);
  if (atoms < MIN_LIBRARY_ATOMS) warnings.push(fewAtoms(r));
  const limit = ctx.config.LIBRARY_BUILD_TIME_LIMIT_MINUTES;
  if (seconds > limit * 60) {
    warnings.push(`the estimate (${Math.round(seconds / 60)} min) exceeds the time limit of ${limit} min (LIBRARY_BUILD_TIME_LIMIT_MINUTES): take a larger sweep step or fewer harmonics`);
  }
  return { atoms, harmonics: h, secondsPerAtom, seconds, basis, warnings };
}

/** POST …/library-builds/estimate: cheap, on the request thread (parsing the spec and a formula). */
export function estimateLibraryBuild(ctx: AppContext, rawSpec: unknown): LibraryBuildEstimate {
  return estimateOf(ctx, resolveSpec(ctx, rawSpec));
}

/**
 * Queues a library build on the run workers; 400 naming the spec's fields at fault, 429 past the run quotas
 * (a build counts as a run).
 */
export async function startLibraryBuild(ctx: AppContext, projectId: number, userId: number, request: LibraryBuildRequest): Promise<LibraryBuild> {
  const r = resolveSpec(ctx, request.spec);
  const atoms = r.sizes.length ** 2;
  if (atoms < MIN_LIBRARY_ATOMS) {
    throw new AppError(400, `The library spec has a problem — sweep: ${fewAtoms(r)}`, { 'spec.sweep.stepNm': fewAtoms(r) });
  }
  if (request.subsetSize !== undefined && request.subsetSize > atoms) {
    throw new AppError(400, `subsetSize: the sweep has ${atoms} atoms; propose a subset of at most that many`, { subsetSize: `at most ${atoms} (the sweep's atoms)` });
  }
  const estimate = estimateOf(ctx, r);
  const build = await withRunSlot(ctx, { userId, projectId, needsStorage: false }, (transaction) =>
    LibraryBuildModel.create(
      {
        projectId,
        scope: request.scope,
        name: libraryName(r).slice(0, NAME_MAX),
        spec: r.spec,
        subsetSize: request.subsetSize ?? null,
        estimateSeconds: estimate.seconds,
        warnings: estimate.warnings,
        createdById: userId,
        queuedAt: new Date(),
      },
      { transaction },
    ),
  );
  ctx.runQueue.enqueueLibraryBuild(build.id);
  return getLibraryBuild(projectId, userId, build.id).then((found) => found.build);
}

/** Project builds, and the asker's own personal ones. */
const visibleTo = (projectId: number, userId: number) => ({ projectId, [Op.or]: [{ scope: 'project' }, { createdById: userId }] });

/** The project's builds the asker may see, newest first (without their results). */
export async function listLibraryBuilds(projectId: number, userId: number): Promise<LibraryBuild[]> {
  const builds = await LibraryBuildModel.findAll({ where: visibleTo(projectId, userId), attributes: { exclude: ['result'] }, include: [createdBy], order: [['id', 'DESC']] });
  return builds.map(toBuild);
}

async function findBuild(projectId: number, userId: number, buildId: number, withResult: boolean): Promise<LibraryBuildModel> {
  const build = await LibraryBuildModel.findOne({
    where: { id: buildId, ...visibleTo(projectId, userId) },
    attributes: withResult ? undefined : { exclude: ['result'] },
    include: [createdBy],
  });
  if (!build) throw new AppError(404, `This project has no library build ${buildId}`);
  return build;
}

export async function getLibraryBuild(projectId: number, userId: number, buildId: number): Promise<{ build: LibraryBuild; result: LibraryBuildResult | null }> {
  const build = await findBuild(projectId, userId, buildId, true);
  return { build: toBuild(build), result: build.result ?? null };
}

/** Cancels a queued or running build; 409 once it has ended. */
export async function cancelLibraryBuild(ctx: AppContext, projectId: number, userId: number, buildId: number): Promise<LibraryBuild> {
  const build = await findBuild(projectId, userId, buildId, false);
  if (build.status !== 'queued' && build.status !== 'running') throw new AppError(409, `This library build has already ended (${build.status}); there is nothing to cancel`);
  if (!(await ctx.runQueue.cancelLibraryBuild(buildId))) {
    const now = await findBuild(projectId, userId, buildId, false);
    throw new AppError(409, `This library build ended (${now.status}) before it could be cancelled`);
  }
  return toBuild(await findBuild(projectId, userId, buildId, false));
}
