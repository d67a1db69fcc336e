import { queryOptions, useQuery } from '@tanstack/react-query';
import type { RunDetail } from '@shared/schemas/runs';
import { api } from '@/lib/api-client';
import { ACTIVE_POLL_MS, isRunActive } from '@/features/runs/api/run-status';
import { runKeys } from '@/features/runs/api/query-keys';

export function getRun(projectId: number, runId: number, signal?: AbortSignal): Promise<{ run: RunDetail }> {
  return api.get<{ run: RunDetail }>(`/projects/${projectId}/runs/${runId}`, { signal });
}

export function runQueryOptions(projectId: number, runId: number) {
  return queryOptions({
    queryKey: runKeys.detail(projectId, runId),
    queryFn: ({ signal }) => getRun(projectId, runId, signal),
    select: (data) => data.run,
    refetchInterval: (query) => {
      const run = query.state.data?.run;
      return run && isRunActive(run.status) ? ACTIVE_POLL_MS : false;
    },
  });
}

export function useRun(projectId: number, runId: number | null) {
  return useQuery({ ...runQueryOptions(projectId, runId ?? 0), enabled: runId !== null });
}
