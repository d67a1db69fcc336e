/**
 * Runs the comparison jobs of run-compare-task.ts on their own worker thread with the time limit of layout
 * jobs (FAB_JOB_TIME_LIMIT_SECONDS): decoding and pooling two far fields grows with the designs' size, so it
 * never runs on the request thread. The request thread only reads the runs' files from the database, and
 * only when the worker does not hold the pair already.
 */
import { Piscina } from 'piscina';
import type { FarFieldComparison } from '../../../shared/schemas/run-comparison';
import type { AppConfig } from '../../config';
import { AppError } from '../../lib/app-error';
import { workerExecArgv, workerFile } from '../../lib/worker-pool';
import { readArtifactById } from '../fab/run-data';
import type { CompareChannel, CompareView } from './run-compare-paint';
import type { CompareJob, CompareJobResult, CompareRunData } from './run-compare-task';
import { RunArtifactModel, type RunModel } from './run.model';

const TASK_FILE = workerFile('run-compare-task', import.meta.url);
export const COMPARE_FILES = ['design.json', 'farfield_a.npy', 'farfield_b.npy'] as const;

let pool: Piscina<CompareJob, CompareJobResult> | null = null;

/** One thread, started on the first job and ended after a minute without work. */
function comparePool(): Piscina<CompareJob, CompareJobResult> {
  pool ??= new Piscina<CompareJob, CompareJobResult>({ filename: TASK_FILE.href, maxThreads: 1, minThreads: 0, idleTimeout: 60_000, execArgv: workerExecArgv(TASK_FILE) });
  return pool;
}

/** Ends the comparison thread (server stop, end of a test). */
export async function stopCompareJobs(): Promise<void> {
  const closing = pool;
  pool = null;
  if (closing) await closing.destroy();
}

/**
 * Why the far fields of `run` cannot be compared (not finished, files deleted, files missing), or null
 * with the ids of its files in COMPARE_FILES order.
 */
export async function compareFilesOf(run: RunModel): Promise<{ ids: number[]; problem: null } | { ids: null; problem: string }> {
  if (run.status !== 'succeeded') return { ids: null, problem: `run ${run.id} is ${run.status}; only runs that succeeded have far fields` };
  if (run.filesDeletedAt) return { ids: null, problem: `the files of run ${run.id} were deleted` };
  const rows = await RunArtifactModel.findAll({ where: { runId: run.id, name: [...COMPARE_FILES] }, attributes: ['id', 'name'] });
  const missing = COMPARE_FILES.filter((name) => !rows.some((row) => row.name === name));
  if (missing.length) return { ids: null, problem: `run ${run.id} has no ${missing.join(', ')}` };
  return { ids: COMPARE_FILES.map((name) => rows.find((row) => row.name === name)!.id), problem: null };
}

async function runData(runId: number, ids: number[]): Promise<CompareRunData> {
  const [design, a, b] = await Promise.all(ids.map((id) => readArtifactById(id)));
  if (!design.length || !a.length || !b.length) throw new AppError(409, `Run ${runId}'s far fields changed while being read; try again`);
  return { runId, designJson: design.toString('utf8'), farFieldA: new Uint8Array(a), farFieldB: new Uint8Array(b) };
}

type Pair = [{ run: RunModel; ids: number[] }, { run: RunModel; ids: number[] }];

async function runJob(config: AppConfig, pair: Pair, job: { kind: 'summary' } | { kind: 'picture'; channel: CompareChannel; show: CompareView }) {
  const limitMs = config.FAB_JOB_TIME_LIMIT_SECONDS * 1000;
  const signal = AbortSignal.timeout(limitMs);
  const keys = pair.map(({ run, ids }) => `${run.id}:${ids.join(',')}`) as [string, string];
  const submit = (data?: [CompareRunData, CompareRunData]) =>
    comparePool().run({ ...job, keys, data } as CompareJob, {
      signal,
      transferList: data ? data.flatMap((d) => [d.farFieldA.buffer as ArrayBuffer, d.farFieldB.buffer as ArrayBuffer]) : [],
    });
  try {
    let result = await submit();
    if (result.ok === 'need-data') result = await submit(await Promise.all([runData(pair[0].run.id, pair[0].ids), runData(pair[1].run.id, pair[1].ids)]));
    if (result.ok === 'need-data') throw new Error('the comparison worker asked twice for the same data');
    if (result.ok === false) throw new AppError(result.status, result.message);
    return result;
  } catch (error) {
    if (!signal.aborted) throw error;
    throw new AppError(
      503,
      `Comparing the far fields took longer than the limit of ${config.FAB_JOB_TIME_LIMIT_SECONDS} s (FAB_JOB_TIME_LIMIT_SECONDS), waiting included, and was stopped. Try again when the server is less busy.`,
    );
  }
}

/** The common scales of the pair's far fields (worker thread). */
export async function farFieldComparison(config: AppConfig, pair: Pair): Promise<FarFieldComparison> {
  return ((await runJob(config, pair, { kind: 'summary' })) as { summary: FarFieldComparison }).summary;
}

/** One picture of the pair as PNG bytes (worker thread). */
export async function comparisonPng(config: AppConfig, pair: Pair, channel: CompareChannel, show: CompareView): Promise<Buffer> {
  const { png } = (await runJob(config, pair, { kind: 'picture', channel, show })) as { png: Uint8Array };
  return Buffer.from(png.buffer, png.byteOffset, png.byteLength);
}
