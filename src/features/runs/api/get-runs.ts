import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { RUN_SORT_KEYS, RUN_STATUSES, type RunSummary } from '@shared/schemas/runs';
import { api } from '@/lib/api-client';
import { ACTIVE_POLL_MS, isRunActive } from '@/features/runs/api/run-status';
import { runKeys, type RunListFilters } from '@/features/runs/api/query-keys';

const STATUS_FILTERS = [...RUN_STATUSES, 'all'] as const;
const DIRECTIONS = ['asc', 'desc'] as const;

export const defaultRunFilters: RunListFilters = { status: 'all', revision: null, sort: 'queuedAt', dir: 'desc' };

function pick<T extends string>(value: string | null, allowed: readonly T[], fallback: T): T {
  return value !== null && (allowed as readonly string[]).includes(value) ? (value as T) : fallback;
}

/** Reads the run list filters from the address bar so a filtered list can be bookmarked and shared. */
export function runFiltersFromSearch(search: URLSearchParams): RunListFilters {
  const revision = search.get('revision');
  return {
    status: pick(search.get('status'), STATUS_FILTERS, defaultRunFilters.status),
    revision: revision && /^[1-9][0-9]{0,8}$/.test(revision) ? Number(revision) : null,
    sort: pick(search.get('sort'), RUN_SORT_KEYS, defaultRunFilters.sort),
    dir: pick(search.get('dir'), DIRECTIONS, defaultRunFilters.dir),
  };
}

export function getRuns(projectId: number, filters: RunListFilters, signal?: AbortSignal): Promise<{ runs: RunSummary[] }> {
  return api.get<{ runs: RunSummary[] }>(`/projects/${projectId}/runs`, {
    params: { status: filters.status, revision: filters.revision, sort: filters.sort, dir: filters.dir },
    signal,
  });
}

export function runsQueryOptions(projectId: number, filters: RunListFilters) {
  return queryOptions({
    queryKey: runKeys.list(projectId, filters),
    queryFn: ({ signal }) => getRuns(projectId, filters, signal),
    placeholderData: keepPreviousData,
    staleTime: 5_000,
    refetchInterval: (query) => (query.state.data?.runs.some((run) => isRunActive(run.status)) ? ACTIVE_POLL_MS : false),
  });
}

export function useRuns(projectId: number, filters: RunListFilters) {
  return useQuery(runsQueryOptions(projectId, filters));
}
