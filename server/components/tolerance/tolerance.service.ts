import type { ToleranceRequestBody, ToleranceStudy } from '../../../shared/schemas/tolerance';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import type { Design } from '../../../shared/schemas/design';
import { requireMemoryBudget, withRunSlot } from '../quotas/quota.service';
import { RevisionModel } from '../revisions/revision.model';
import { findRun } from '../runs/run.service';
import { ToleranceStudyModel } from './tolerance.model';
import { runStatusPhrase } from '../../../shared/display-names';

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

function toStudy(study: ToleranceStudyModel): ToleranceStudy {
  const end = study.finishedAt ?? null;
  return {
    id: study.id,
    runId: study.runId,
    status: study.status,
    progress: study.progress,
    stage: study.stage,
    request: study.request,
    results: study.results ?? null,
    error: study.error ?? null,
    queuedAt: study.queuedAt.toISOString(),
    startedAt: iso(study.startedAt),
    finishedAt: iso(end),
    durationMs: study.startedAt && end ? end.getTime() - study.startedAt.getTime() : null,
  };
}

/** The latest tolerance study of a run of the project (null: none yet); 404 for a run of another project. */
export async function getToleranceStudy(projectId: number, runId: number): Promise<ToleranceStudy | null> {
  await findRun(projectId, runId);
  const study = await ToleranceStudyModel.findOne({ where: { runId }, order: [['id', 'DESC']] });
  return study ? toStudy(study) : null;
}

/**
 * Queues a tolerance study of a finished run on the run queue's worker pool. 409 when the run has not
 * succeeded or a study of it is still queued or running; 429 past the limits of runs at once (a study
 * counts as a run); 413 when the run's design no longer fits RUN_MEMORY_BUDGET_MB (the run's estimate bounds
 * the study's peak).
 */
export async function startToleranceStudy(ctx: AppContext, projectId: number, runId: number, userId: number, request: ToleranceRequestBody): Promise<ToleranceStudy> {
  const run = await findRun(projectId, runId);
  if (run.status !== 'succeeded') throw new AppError(409, `Run ${runId} is ${runStatusPhrase(run.status)}; a bias and detuning sweep needs a finished run`);
  if (run.filesDeletedAt) throw new AppError(409, `The files of run ${runId} were deleted; a tolerance study needs them. Start the revision again.`);
  const revision = await RevisionModel.findByPk(run.revisionId, { attributes: ['design'] });
  if (revision) requireMemoryBudget(ctx.config, JSON.parse(revision.design) as Design, 'study');
  const latest = await ToleranceStudyModel.findOne({ where: { runId }, order: [['id', 'DESC']], attributes: ['id', 'status'] });
  if (latest && (latest.status === 'queued' || latest.status === 'running')) {
    throw new AppError(409, `A bias and detuning sweep of run ${runId} is already ${runStatusPhrase(latest.status)}; wait for it to finish`);
  }
  const study = await withRunSlot(ctx, { userId, projectId, needsStorage: false }, (transaction) =>
    ToleranceStudyModel.create({ runId, request, startedById: userId, queuedAt: new Date(), stage: 'queued' }, { transaction }),
  );
  ctx.runQueue.enqueueTolerance(study.id);
  return toStudy(study);
}
