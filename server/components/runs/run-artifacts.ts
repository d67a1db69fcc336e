/**
 * Run artifacts in the database: each output file as ≤ 8 MiB chunks (one row each), so no single row
 * exceeds what one MariaDB packet may carry (max_allowed_packet 64M) and a 200 MB layout never has to be
 * in memory at once, neither when it is stored nor when it is downloaded.
 */
import { open } from 'node:fs/promises';
import { join } from 'node:path';
import type { Writable } from 'node:stream';
import type { Transaction } from 'sequelize';
import type { RunArtifact } from '../../../shared/schemas/runs';
import { select } from '../../db/select';
import { describeArtifact } from './run-outcome';
import type { RunOutputFile } from './run-task';
import { RunArtifactChunkModel, RunArtifactModel } from './run.model';

export const ARTIFACT_CHUNK_BYTES = 8 * 1024 * 1024;

interface PreparedStatements {
  execute(sql: string, values: unknown[]): Promise<unknown>;
}

/**
 * Inserts one chunk as a prepared statement, whose binary protocol sends the bytes as they are. An ordinary
 * query (Sequelize's `create`) has the driver escape them into the SQL text byte by byte on the event loop:
 * ≈ 14 ms per MiB on these machines, so every 8 MiB chunk of a finishing run stalled all requests for
 * about 0.1 s.
 */
async function insertChunk(artifactId: number, seq: number, bytes: Buffer): Promise<void> {
  const { connectionManager } = RunArtifactChunkModel.sequelize!;
  const connection = await connectionManager.getConnection({ type: 'write' });
  try {
    await (connection as unknown as PreparedStatements).execute(
      'INSERT INTO run_artifact_chunks (artifact_id, seq, bytes) VALUES (?, ?, ?)',
      [artifactId, seq, bytes],
    );
  } finally {
    await connectionManager.releaseConnection(connection);
  }
}

/**
 * Stores the files of `dir` as the artifacts of run `runId`, replacing any it had. With `reserve`, the rows
 * are created through it (which may refuse: false, nothing stored).
 */
export async function storeArtifacts(
  runId: number,
  dir: string,
  files: RunOutputFile[],
  chunkBytes = ARTIFACT_CHUNK_BYTES,
  reserve?: (createRows: (transaction: Transaction) => Promise<RunArtifactModel[]>) => Promise<RunArtifactModel[] | null>,
): Promise<boolean> {
  // The rows first, with the sizes the worker reported: they are what the project's storage quota counts, so
  // `reserve` can check and create them under the project's lock before the bytes are written.
  const createRows = async (transaction?: Transaction) => {
    await RunArtifactModel.destroy({ where: { runId }, transaction });
    const rows: RunArtifactModel[] = [];
    for (const file of files) rows.push(await RunArtifactModel.create({ runId, name: file.name, ...describeArtifact(file.name), size: file.bytes }, { transaction }));
    return rows;
  };
  const rows = reserve ? await reserve(createRows) : await createRows();
  if (!rows) return false;
  const buffer = Buffer.alloc(chunkBytes);
  for (const artifact of rows) {
    const handle = await open(join(dir, artifact.name), 'r');
    let size = 0;
    try {
      for (let seq = 0; ; seq++) {
        const { bytesRead } = await handle.read(buffer, 0, chunkBytes, null);
        if (bytesRead === 0 && seq > 0) break;
        await insertChunk(artifact.id, seq, buffer.subarray(0, bytesRead));
        size += bytesRead;
        if (bytesRead < chunkBytes) break;
      }
    } finally {
      await handle.close();
    }
    if (artifact.size !== size) {
      artifact.size = size;
      await artifact.save();
    }
  }
  return true;
}

export async function deleteArtifacts(runId: number): Promise<void> {
  await RunArtifactModel.destroy({ where: { runId } });
}

/**
 * The files of a run, in the order they were stored (plain rows: a run has dozens, read on every detail view).
 * Tile pyramids (`.tiles`, run-tiles.ts) are not listed: the preview they belong to says `tiled` instead.
 */
export async function listArtifacts(runId: number): Promise<RunArtifact[]> {
  const artifacts = await select<RunArtifact>('SELECT name, mime, size, label FROM run_artifacts WHERE run_id = ? ORDER BY id ASC', [runId]);
  const tiled = new Set(artifacts.filter((a) => a.name.endsWith('.tiles')).map((a) => a.name.replace(/\.tiles$/, '.png')));
  return artifacts
    .filter((a) => !a.name.endsWith('.tiles'))
    .map((a) => ({ name: a.name, mime: a.mime, size: Number(a.size), label: a.label, ...(tiled.has(a.name) ? { tiled: true } : {}) }));
}

export async function findArtifact(runId: number, name: string): Promise<RunArtifactModel | null> {
  return RunArtifactModel.findOne({ where: { runId, name } });
}

/**
 * Writes an artifact's chunks to `out` in order, one chunk in memory at a time, waiting for the
 * client to drain; stops early when the client has gone.
 */
export async function streamArtifact(artifactId: number, out: Writable): Promise<void> {
  const chunks = await RunArtifactChunkModel.findAll({ where: { artifactId }, attributes: ['id'], order: [['seq', 'ASC']] });
  for (const { id } of chunks) {
    if (out.destroyed) return;
    const chunk = await RunArtifactChunkModel.findByPk(id, { attributes: ['bytes'] });
    if (!chunk) throw new Error(`artifact chunk ${id} disappeared while streaming`);
    if (!out.write(chunk.bytes)) {
      await new Promise<void>((resolve) => {
        const done = () => {
          out.off('drain', done);
          out.off('close', done);
          resolve();
        };
        out.on('drain', done);
        out.on('close', done);
      });
    }
  }
}
