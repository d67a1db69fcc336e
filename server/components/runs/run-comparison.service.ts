import { diffMetrics } from '../../../shared/run-diff';
import type { ComparePictureQuery, CompareRunsQuery, RunComparison } from '../../../shared/schemas/run-comparison';
import type { AppContext } from '../../context';
import { AppError } from '../../lib/app-error';
import { compareFilesOf, comparisonPng, farFieldComparison } from './run-compare-jobs';
import { findRun, getRunSummary } from './run.service';

/** Both runs of the project (404 naming the one it lacks) with their comparable files, or why not. */
async function pairOf(projectId: number, query: { a: number; b: number }) {
  const runs = [await findRun(projectId, query.a), await findRun(projectId, query.b)];
  const files = await Promise.all(runs.map((run) => compareFilesOf(run)));
  const problems = files.flatMap((f) => (f.problem ? [f.problem] : []));
  return { runs, files, problem: problems.length ? `No far fields to compare: ${problems.join('; ')}.` : null };
}

/** Two runs of a project side by side: their summaries, every metric with its change, the far fields' common scales. */
export async function compareRuns(ctx: AppContext, projectId: number, query: CompareRunsQuery): Promise<RunComparison> {
  const { runs, files, problem } = await pairOf(projectId, query);
  const [a, b] = await Promise.all([getRunSummary(projectId, query.a), getRunSummary(projectId, query.b)]);
  const farFields = problem
    ? null
    : await farFieldComparison(ctx.config, [
        { run: runs[0], ids: files[0].ids! },
        { run: runs[1], ids: files[1].ids! },
      ]);
  return { a, b, metrics: diffMetrics(runs[0].metrics ?? null, runs[1].metrics ?? null), farFields, farFieldsNote: problem };
}

/** One far-field picture of the comparison as PNG; 409 when a run has no far fields or the view has no difference. */
export async function comparePicture(ctx: AppContext, projectId: number, query: ComparePictureQuery): Promise<Buffer> {
  const { runs, files, problem } = await pairOf(projectId, query);
  if (problem) throw new AppError(409, problem);
  return comparisonPng(
    ctx.config,
    [
      { run: runs[0], ids: files[0].ids! },
      { run: runs[1], ids: files[1].ids! },
    ],
    query.channel,
    query.show,
  );
}
