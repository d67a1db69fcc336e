import type { QueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { useNavigate, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { projectRoleAllows } from '@shared/roles';
import type { ListRunsQuery } from '@shared/schemas/runs';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { EmptyState } from '@/components/ui/empty-state';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { defaultRunFilters, runFiltersFromSearch, runsQueryOptions, useRuns } from '@/features/runs/api/get-runs';
import type { RunListFilters } from '@/features/runs/api/query-keys';
import { RunListControls } from '@/features/runs/components/run-list-controls';
import { RunsTable } from '@/features/runs/components/runs-table';
import { StartRunButton } from '@/features/runs/components/start-run-dialog';
import { CompareRunsBar } from '@/features/runs/components/compare-runs-bar';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

export const clientLoader =
  (queryClient: QueryClient) =>
  ({ params, request }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    if (projectId) void queryClient.prefetchQuery(runsQueryOptions(projectId, runFiltersFromSearch(new URL(request.url).searchParams)));
    return null;
  };

const firstDirection: Record<ListRunsQuery['sort'], 'asc' | 'desc'> = {
  queuedAt: 'desc',
  durationMs: 'asc',
  status: 'asc',
  revisionNumber: 'desc',
};

function toSearch(filters: RunListFilters): URLSearchParams {
  const search = new URLSearchParams();
  for (const key of ['status', 'revision', 'sort', 'dir'] as const) {
    if (filters[key] !== defaultRunFilters[key] && filters[key] !== null) search.set(key, String(filters[key]));
  }
  return search;
}

export default function ProjectRunsRoute() {
  const { project } = useProjectOutlet();
  const navigate = useNavigate();
  const [searchParams, setSearchParams] = useSearchParams();
  const filters = runFiltersFromSearch(searchParams);
  const runs = useRuns(project.id, filters);
  const canRun = projectRoleAllows(project.myRole, 'design') && !project.archived;
  const [compared, setCompared] = useState<number[]>([]);
  const toggleCompared = (runId: number) => setCompared((ids) => (ids.includes(runId) ? ids.filter((id) => id !== runId) : [...ids, runId].slice(-2)));

  const applyFilters = (next: Partial<RunListFilters>) => setSearchParams(toSearch({ ...filters, ...next }), { replace: true });
  const sortBy = (sort: ListRunsQuery['sort']) =>
    applyFilters({ sort, dir: filters.sort === sort ? (filters.dir === 'asc' ? 'desc' : 'asc') : firstDirection[sort] });

  const latestRevision = runs.data?.runs.reduce((max, run) => Math.max(max, run.revisionNumber), 0) || null;
  const startButton = (label?: string) => (
    <StartRunButton
      projectId={project.id}
      suggestedRevision={filters.revision ?? latestRevision}
      onStarted={(run) => navigate(paths.projects.run.getHref(project.id, run.id))}
      label={label}
    />
  );
  const filtered = filters.status !== 'all' || filters.revision !== null;

  return (
    <>
      <title>{`Runs of ${project.name} · Phasewright`}</title>
      <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
        <div className="min-w-0">
          <h2 className="text-xl font-extrabold">Runs</h2>
          <p className="mt-1 max-w-2xl text-sm text-ink-soft">
            Each run turns one saved revision into channel phases, a meta-atom layout and a simulated preview with its
            metrics. The list refreshes by itself while a run is waiting or running.
          </p>
        </div>
        {canRun ? startButton() : null}
      </div>
      <RunListControls filters={filters} onChange={applyFilters} />
      {runs.isPending ? (
        <PageLoader label="Loading runs" />
      ) : runs.isError ? (
        <Banner title="The run list did not load">
          <p>{runs.error.message}</p>
          <Button variant="secondary" size="sm" className="mt-3" onClick={() => void runs.refetch()}>
            Try again
          </Button>
        </Banner>
      ) : runs.data.runs.length > 0 ? (
        <>
          <p className="sr-only" role="status">
            {runs.data.runs.length} {runs.data.runs.length === 1 ? 'run' : 'runs'} shown
          </p>
          <CompareRunsBar projectId={project.id} selected={compared} onClear={() => setCompared([])} />
          <RunsTable projectId={project.id} runs={runs.data.runs} filters={filters} onSort={sortBy} stale={runs.isPlaceholderData} selected={compared} onToggle={toggleCompared} />
        </>
      ) : filtered ? (
        <EmptyState
          title="No run matches these filters"
          action={
            <Button variant="secondary" onClick={() => applyFilters({ status: 'all', revision: null })}>
              Show every run
            </Button>
          }
        >
          Nothing here{filters.revision !== null ? ` for revision ${filters.revision}` : ''}
          {filters.status !== 'all' ? ' with that status' : ''}. Clear the filters to see the whole list.
        </EmptyState>
      ) : (
        <EmptyState title="No runs yet" action={canRun ? startButton('Start the first run') : null}>
          {canRun ? (
            <>
              Save the design as a revision on the Design tab, then press <strong>Start a run</strong> and give its
              revision number. The run works in the background and shows up here with its progress.
            </>
          ) : (
            <>
              Owners and designers start runs from a saved revision of the design. When they do, the runs appear here
              with their progress, previews and metrics.
            </>
          )}
        </EmptyState>
      )}
    </>
  );
}
