import type { QueryClient } from '@tanstack/react-query';
import { Link, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import type { RunSummary } from '@shared/schemas/runs';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { ArrowLeftIcon } from '@/components/ui/icons';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import { defaultRunFilters, useRuns } from '@/features/runs/api/get-runs';
import { runComparisonQueryOptions, useRunComparison } from '@/features/runs/api/get-run-comparison';
import { ComparisonFarFields } from '@/features/runs/components/comparison-far-fields';
import { formatDb, formatPercent } from '@/features/runs/components/format-run';
import { MetricChangesTable } from '@/features/runs/components/metric-changes-table';
import { RunPairPicker } from '@/features/runs/components/run-pair-picker';
import { RunStatusBadge } from '@/features/runs/components/run-status-badge';
import { useRevisionComparison } from '@/features/designs/api/compare-revisions';
import { RevisionComparison } from '@/features/designs/components/revision-comparison';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

function parseRunId(value: string | null): number | null {
  return value && /^[1-9][0-9]{0,9}$/.test(value) ? Number(value) : null;
}

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ params, request }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    const search = new URL(request.url).searchParams;
    const a = parseRunId(search.get('a'));
    const b = parseRunId(search.get('b'));
    if (projectId && a && b && a !== b) await queryClient.prefetchQuery(runComparisonQueryOptions(projectId, a, b));
    return null;
  };

function RunHeader({ projectId, run, side }: { projectId: number; run: RunSummary; side: 'a' | 'b' }) {
  return (
    <div className="flex min-w-0 flex-col gap-1 rounded-2xl bg-paper px-4 py-3" data-compare-side={side}>
      <span className="text-xs font-bold tracking-wide text-ink-soft uppercase">Run {side}</span>
      <span className="flex flex-wrap items-center gap-2">
        <Link to={paths.projects.run.getHref(projectId, run.id)} className="text-lg font-extrabold decoration-ember decoration-2 underline-offset-4 hover:underline">
          Run {run.id}
        </Link>
        <RunStatusBadge status={run.status} />
      </span>
      <span className="text-sm">
        Revision {run.revisionNumber} · {run.startedBy?.name ?? 'a former member'} · <time dateTime={run.queuedAt}>{formatDateTime(run.queuedAt)}</time>
      </span>
      <span className="text-sm text-ink-soft tabular-nums">
        Efficiency A {formatPercent(run.headline.efficiencyA)} · B {formatPercent(run.headline.efficiencyB)} · crosstalk {formatDb(run.headline.crosstalkDb)} · zero order{' '}
        {formatPercent(run.headline.zeroOrder, 2)}
      </span>
    </div>
  );
}

function DesignChanges({ projectId, a, b }: { projectId: number; a: number; b: number }) {
  const same = a === b;
  const comparison = useRevisionComparison(projectId, same ? null : a, same ? null : b);
  if (same) {
    return (
      <Card title="Design changes">
        <p className="text-sm text-ink-soft">Both runs are of revision {a}: the same design, so any difference above comes from the runs themselves.</p>
      </Card>
    );
  }
  if (comparison.isPending) return <PageLoader label={`Comparing revisions ${a} and ${b}`} />;
  if (comparison.isError) return <Banner title="The design changes did not load">{comparison.error.message}</Banner>;
  return <RevisionComparison projectId={projectId} a={comparison.data.a} b={comparison.data.b} changes={comparison.data.changes} />;
}

export default function CompareRunsRoute() {
  const { project } = useProjectOutlet();
  const [search, setSearch] = useSearchParams();
  const a = parseRunId(search.get('a'));
  const b = parseRunId(search.get('b'));
  const runs = useRuns(project.id, defaultRunFilters);
  const comparison = useRunComparison(project.id, a, b);
  const choose = (nextA: number | null, nextB: number | null) => {
    const next = new URLSearchParams();
    if (nextA) next.set('a', String(nextA));
    if (nextB) next.set('b', String(nextB));
    setSearch(next, { replace: true });
  };

  let body;
  if (a === null || b === null) {
    body = <Banner tone="info" title="Choose two runs">Pick run a and run b above — any two runs of this project, of any revisions.</Banner>;
  } else if (a === b) {
    body = <Banner title="Choose two different runs">Run a and run b are both run {a}.</Banner>;
  } else if (comparison.isPending) {
    body = <PageLoader label={`Comparing runs ${a} and ${b}`} />;
  } else if (comparison.isError) {
    body = (
      <Banner title="The comparison did not load">
        <p>{comparison.error.message}</p>
        {isApiError(comparison.error, 404) || isApiError(comparison.error, 400) ? null : (
          <Button variant="secondary" size="sm" className="mt-3" onClick={() => void comparison.refetch()}>
            Try again
          </Button>
        )}
      </Banner>
    );
  } else {
    const data = comparison.data.comparison;
    body = (
      <>
        <div className="grid gap-3 md:grid-cols-2">
          <RunHeader projectId={project.id} run={data.a} side="a" />
          <RunHeader projectId={project.id} run={data.b} side="b" />
        </div>
        <ComparisonFarFields projectId={project.id} runA={data.a.id} runB={data.b.id} farFields={data.farFields} note={data.farFieldsNote} />
        {data.metrics.length > 0 ? (
          <MetricChangesTable rows={data.metrics} runA={data.a.id} runB={data.b.id} />
        ) : (
          <Card title="Metrics">
            <p className="text-sm text-ink-soft">Neither run has metrics yet: they appear when a run succeeds.</p>
          </Card>
        )}
        <section aria-labelledby="design-changes" className="flex flex-col gap-4">
          <h2 id="design-changes" className="text-lg font-extrabold">
            Design changes (revision {data.a.revisionNumber} → revision {data.b.revisionNumber})
          </h2>
          <DesignChanges projectId={project.id} a={data.a.revisionNumber} b={data.b.revisionNumber} />
        </section>
      </>
    );
  }

  return (
    <div className="flex flex-col gap-5">
      <title>{`Runs ${a ?? '?'} and ${b ?? '?'} · ${project.name} · Phasewright`}</title>
      <div>
        <Link to={paths.projects.runs.getHref(project.id)} className="inline-flex items-center gap-1.5 rounded text-sm font-bold text-ink-soft hover:text-ink">
          <ArrowLeftIcon className="size-4" />
          All runs
        </Link>
        <h2 className="mt-1 text-xl font-extrabold">{a !== null && b !== null && a !== b ? `Run ${a} beside run ${b}` : 'Compare two runs'}</h2>
      </div>
      {runs.data ? <RunPairPicker runs={runs.data.runs} a={a} b={b} onChange={choose} /> : null}
      {body}
    </div>
  );
}
