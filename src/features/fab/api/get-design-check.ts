import { queryOptions, useQuery } from '@tanstack/react-query';
import type { RunDesignCheck } from '@shared/schemas/fab';
import { api } from '@/lib/api-client';
import { fabKeys } from '@/features/fab/api/query-keys';

export async function getDesignCheck(projectId: number, runId: number, signal?: AbortSignal) {
  return (await api.get<{ check: RunDesignCheck }>(`/projects/${projectId}/runs/${runId}/design-check`, { signal })).check;
}

export function designCheckQueryOptions(projectId: number, runId: number) {
  return queryOptions({ queryKey: fabKeys.designCheck(projectId, runId), queryFn: ({ signal }) => getDesignCheck(projectId, runId, signal) });
}

/** The run's design-rule result and overrides; only for a run that succeeded. */
export function useDesignCheck(projectId: number, runId: number, enabled = true) {
  return useQuery({ ...designCheckQueryOptions(projectId, runId), enabled });
}
