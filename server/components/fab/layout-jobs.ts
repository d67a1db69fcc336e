/**
 * Runs the layout jobs of layout-task.ts — layout regions, design checks of old runs, GDSII regeneration —
 * on their own worker thread with a time limit (FAB_JOB_TIME_LIMIT_SECONDS): past it the thread is stopped
 * and the request answered 503 naming the limit. The request thread only reads the run's files from the
 * database, and only when the worker does not hold the run's layout already.
 */
import { Piscina } from 'piscina';
import type { AppConfig } from '../../config';
import { AppError } from '../../lib/app-error';
import { workerExecArgv, workerFile } from '../../lib/worker-pool';
import { RunArtifactModel, type RunModel } from '../runs/run.model';
import type { GdsOptions, LayoutData, LayoutJob, LayoutJobResult, StoredDrc } from './layout-task';
import { readArtifactById, readArtifactOwned, requireSucceeded } from './run-data';
import type { LayoutRegion } from '../../../shared/schemas/fab';

const TASK_FILE = workerFile('layout-task', import.meta.url);
const LAYOUT_FILES = ['design.json', 'atoms.csv', 'atom_index.npy', 'theta.npy'] as const;

let pool: Piscina<LayoutJob, LayoutJobResult> | null = null;

/** One thread, started on the first job and ended after a minute without work. */
function layoutPool(): Piscina<LayoutJob, LayoutJobResult> {
  pool ??= new Piscina<LayoutJob, LayoutJobResult>({ filename: TASK_FILE.href, maxThreads: 1, minThreads: 0, idleTimeout: 60_000, execArgv: workerExecArgv(TASK_FILE) });
  return pool;
}

/** Ends the layout thread (server stop, end of a test). */
export async function stopLayoutJobs(): Promise<void> {
  const closing = pool;
  pool = null;
  if (closing) await closing.destroy();
}

interface LayoutFile {
  id: number;
  size: number;
}

/** The run's layout files (in LAYOUT_FILES order), whose ids name exactly these bytes; 409 when one is missing. */
async function layoutFiles(run: RunModel): Promise<LayoutFile[]> {
  const rows = await RunArtifactModel.findAll({ where: { runId: run.id, name: [...LAYOUT_FILES] }, attributes: ['id', 'name', 'size'] });
  const missing = LAYOUT_FILES.filter((name) => !rows.some((row) => row.name === name));
  if (missing.length) throw new AppError(409, `Run ${run.id} has no ${missing.join(', ')}; start the run again to produce it`);
  return LAYOUT_FILES.map((name) => rows.find((row) => row.name === name)!).map((row) => ({ id: row.id, size: row.size }));
}

/**
 * The bytes of the very files `files` names (the ones the job's key names). The arrays (201 MB at 4096²) are
 * read straight into buffers of their own, which go to the worker without a copy.
 */
async function layoutData(run: RunModel, files: LayoutFile[]): Promise<LayoutData> {
  const [design, atoms, index, theta] = [
    await readArtifactById(files[0].id),
    await readArtifactById(files[1].id),
    await readArtifactOwned(files[2].id, files[2].size),
    await readArtifactOwned(files[3].id, files[3].size),
  ];
  if (!design.length || !atoms.length || !index.length || !theta.length) throw new AppError(409, `Run ${run.id}'s layout files changed while being read; try again`);
  return { designJson: design.toString('utf8'), atomsCsv: atoms.toString('utf8'), atomIndexNpy: index, thetaNpy: theta };
}

type JobOf<K extends LayoutJob['kind']> = Omit<Extract<LayoutJob, { kind: K }>, 'runId' | 'key' | 'data'>;

async function runJob(config: AppConfig, run: RunModel, job: JobOf<'region'> | JobOf<'check'> | JobOf<'gds'>): Promise<LayoutJobResult & { ok: true }> {
  requireSucceeded(run);
  const limitMs = config.FAB_JOB_TIME_LIMIT_SECONDS * 1000;
  const signal = AbortSignal.timeout(limitMs);
  const files = await layoutFiles(run);
  const key = `${run.id}:${files.map((f) => f.id).join(',')}`;
  const submit = (data?: LayoutData) =>
    layoutPool().run({ ...job, runId: run.id, key, data } as LayoutJob, {
      signal,
      transferList: data ? [data.atomIndexNpy.buffer as ArrayBuffer, data.thetaNpy.buffer as ArrayBuffer] : [],
    });
  try {
    let result = await submit();
    if (result.ok === 'need-data') result = await submit(await layoutData(run, files));
    if (result.ok === 'need-data') throw new Error('the layout worker asked twice for the same data');
    if (result.ok === false) throw new AppError(result.status, result.message, result.details);
    return result;
  } catch (error) {
    if (!signal.aborted) throw error;
    throw new AppError(
      503,
      `This layout job took longer than the limit of ${config.FAB_JOB_TIME_LIMIT_SECONDS} s (FAB_JOB_TIME_LIMIT_SECONDS), waiting included, and was stopped. Try again when the server is less busy, or ask your administrator to raise the limit.`,
    );
  }
}

/** Pillars and violations of a region of a finished run's layout (worker thread). */
export async function layoutRegion(config: AppConfig, run: RunModel, query: { x0: number; y0: number; size: number }): Promise<LayoutRegion> {
  const result = await runJob(config, run, { kind: 'region', ...query });
  return (result as { region: LayoutRegion }).region;
}

/** The whole layout's design-rule check, for a run stored before drc.json existed (worker thread). */
export async function recheckDesignRules(config: AppConfig, run: RunModel): Promise<StoredDrc> {
  const result = await runJob(config, run, { kind: 'check' });
  return (result as { check: StoredDrc }).check;
}

/** Writes the run's layout as GDSII with `options` to `outFile` (worker thread); returns its size. */
export async function regenerateGds(config: AppConfig, run: RunModel, options: GdsOptions, outFile: string): Promise<number> {
  const result = await runJob(config, run, { kind: 'gds', options, outFile });
  return (result as { gdsBytes: number }).gdsBytes;
}
