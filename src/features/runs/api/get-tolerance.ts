import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ToleranceStudy } from '@shared/schemas/tolerance';
import { api } from '@/lib/api-client';
import { ACTIVE_POLL_MS } from '@/features/runs/api/run-status';
import { runKeys } from '@/features/runs/api/query-keys';

export function getTolerance(projectId: number, runId: number, signal?: AbortSignal): Promise<{ study: ToleranceStudy | null }> {
  return api.get<{ study: ToleranceStudy | null }>(`/projects/${projectId}/runs/${runId}/tolerance`, { signal });
}

export const isStudyActive = (study: ToleranceStudy | null | undefined) => study?.status === 'queued' || study?.status === 'running';

export function toleranceQueryOptions(projectId: number, runId: number) {
  return queryOptions({
    queryKey: runKeys.tolerance(projectId, runId),
    queryFn: ({ signal }) => getTolerance(projectId, runId, signal),
    select: (data) => data.study,
    refetchInterval: (query) => (isStudyActive(query.state.data?.study) ? ACTIVE_POLL_MS : false),
  });
}

export function useTolerance(projectId: number, runId: number, enabled: boolean) {
  return useQuery({ ...toleranceQueryOptions(projectId, runId), enabled });
}
