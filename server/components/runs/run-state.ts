/**
 * The life of a run row, whatever queue executes it: queued → running → succeeded | failed | cancelled.
 * Every transition is a conditional update (it only applies from the states it names), so a late progress
 * report can never overwrite a cancellation, and each transition writes a run event.
 */
import { Op, type InferAttributes } from 'sequelize';
import type { RunStatus } from '../../../shared/schemas/runs';
import { deleteArtifacts } from './run-artifacts';
import { touchProject } from '../projects/project.model';
import { RunEventModel, RunModel } from './run.model';

/** A run interrupted by a server stop this many times is given up. */
export const MAX_ATTEMPTS = 3;

type RunFinishedListener = (runId: number, status: 'succeeded' | 'failed') => void;
const finishedListeners = new Set<RunFinishedListener>();

/** Called once per run that reaches succeeded or failed (e.g. to notify who started it); returns the unsubscribe. */
export function onRunFinished(listener: RunFinishedListener): () => void {
  finishedListeners.add(listener);
  return () => finishedListeners.delete(listener);
}

function finished(runId: number, status: 'succeeded' | 'failed') {
  for (const listener of finishedListeners) listener(runId, status);
}

export async function addEvent(runId: number, status: RunStatus, stage: string, message: string) {
  await RunEventModel.create({ runId, status, stage, message, at: new Date() });
}

async function transition(runId: number, from: RunStatus[], values: Partial<InferAttributes<RunModel>>): Promise<boolean> {
  const [count] = await RunModel.update(values, { where: { id: runId, status: { [Op.in]: from } } });
  return count > 0;
}

/** A run that ended changes its project: its "last change" follows. */
async function touchProjectOf(runId: number): Promise<void> {
  const run = await RunModel.findByPk(runId, { attributes: ['id', 'projectId'] });
  if (run) await touchProject(run.projectId);
}

/** A worker picked the run up: running, one more attempt. False when it is no longer queued (cancelled). */
export async function markStarted(runId: number): Promise<boolean> {
  const run = await RunModel.findByPk(runId, { attributes: ['id', 'attempts', 'status'] });
  if (!run || run.status !== 'queued') return false;
  const attempt = run.attempts + 1;
  const ok = await transition(runId, ['queued'], { status: 'running', attempts: attempt, startedAt: new Date(), stage: 'prepare', progress: 0, error: null });
  if (ok) await addEvent(runId, 'running', 'prepare', attempt > 1 ? `started again (attempt ${attempt} of ${MAX_ATTEMPTS})` : 'started');
  return ok;
}

export async function recordProgress(runId: number, values: { progress: number; stage: string; convergence: { a: number[]; b: number[] } }): Promise<boolean> {
  return transition(runId, ['running'], values);
}

export async function markSucceeded(
  runId: number,
  values: Pick<RunModel, 'metrics' | 'plots' | 'headline' | 'convergence'>,
): Promise<boolean> {
  const run = await RunModel.findByPk(runId, { attributes: ['id', 'startedAt'] });
  const finishedAt = new Date();
  const ok = await transition(runId, ['running'], {
    ...values,
    status: 'succeeded',
    progress: 1,
    stage: 'done',
    finishedAt,
    durationMs: run?.startedAt ? finishedAt.getTime() - run.startedAt.getTime() : null,
  });
  if (ok) {
    await addEvent(runId, 'succeeded', 'done', 'finished');
    await touchProjectOf(runId);
    finished(runId, 'succeeded');
  }
  return ok;
}

export async function markFailed(runId: number, error: string, from: RunStatus[] = ['queued', 'running']): Promise<boolean> {
  const run = await RunModel.findByPk(runId, { attributes: ['id', 'startedAt', 'stage'] });
  const finishedAt = new Date();
  const ok = await transition(runId, from, {
    status: 'failed',
    error,
    finishedAt,
    durationMs: run?.startedAt ? finishedAt.getTime() - run.startedAt.getTime() : null,
  });
  if (ok) {
    await addEvent(runId, 'failed', run?.stage ?? '', error);
    await touchProjectOf(runId);
    finished(runId, 'failed');
  }
  return ok;
}

export async function markCancelled(runId: number): Promise<boolean> {
  const run = await RunModel.findByPk(runId, { attributes: ['id', 'startedAt', 'stage'] });
  const finishedAt = new Date();
  const ok = await transition(runId, ['queued', 'running'], {
    status: 'cancelled',
    finishedAt,
    durationMs: run?.startedAt ? finishedAt.getTime() - run.startedAt.getTime() : null,
  });
  if (ok) {
    await addEvent(runId, 'cancelled', run?.stage ?? '', 'cancelled');
    await touchProjectOf(runId);
  }
  return ok;
}

/**
 * After a server start: runs left running were interrupted by the stop — queued again unless they have
 * had MAX_ATTEMPTS starts already, then failed; runs left queued simply wait again. Returns the ids to
 * queue, oldest first.
 */
export async function recoverInterrupted(): Promise<{ requeue: number[]; failed: number[] }> {
  const stale = await RunModel.findAll({
    where: { status: { [Op.in]: ['queued', 'running'] } },
    attributes: ['id', 'status', 'attempts'],
    order: [['queuedAt', 'ASC'], ['id', 'ASC']],
  });
  const requeue: number[] = [];
  const failed: number[] = [];
  for (const run of stale) {
    if (run.status === 'running') {
      const outcome = await requeueInterrupted(run, 'the server');
      if (outcome === 'failed') failed.push(run.id);
      if (outcome !== 'queued') continue;
    }
    requeue.push(run.id);
  }
  return { requeue, failed };
}

/**
 * A run left running by a holder that stopped (the server, or a worker process whose job was found stalled):
 * queued again with its partial files deleted, or failed once it has had MAX_ATTEMPTS starts. Null when the
 * row had moved on meanwhile.
 */
export async function requeueInterrupted(run: { id: number; attempts: number }, holder: 'the server' | 'a worker'): Promise<'queued' | 'failed' | null> {
  if (run.attempts >= MAX_ATTEMPTS) {
    const message = `${holder} stopped during this run ${run.attempts} times; start a new run, and if it keeps stopping, make the design smaller or tell your administrator`;
    return (await markFailed(run.id, message, ['running'])) ? 'failed' : null;
  }
  await deleteArtifacts(run.id);
  const ok = await transition(run.id, ['running'], { status: 'queued', progress: 0, stage: 'queued', convergence: null, startedAt: null });
  if (!ok) return null;
  await addEvent(run.id, 'queued', 'queued', `${holder} stopped during attempt ${run.attempts}; queued again`);
  return 'queued';
}
