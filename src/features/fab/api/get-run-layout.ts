import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { LayoutRegion } from '@shared/schemas/fab';
import { api } from '@/lib/api-client';
import { fabKeys } from '@/features/fab/api/query-keys';

export function getRunLayout(projectId: number, runId: number, x0: number, y0: number, size: number, signal?: AbortSignal) {
  return api.get<LayoutRegion>(`/projects/${projectId}/runs/${runId}/layout`, { params: { x0, y0, size }, signal });
}

export function runLayoutQueryOptions(projectId: number, runId: number, x0: number, y0: number, size: number) {
  return queryOptions({
    queryKey: fabKeys.layout(projectId, runId, x0, y0, size),
    queryFn: ({ signal }) => getRunLayout(projectId, runId, x0, y0, size, signal),
    staleTime: Infinity,
    placeholderData: keepPreviousData,
  });
}

export function useRunLayout(projectId: number, runId: number, x0: number, y0: number, size: number) {
  return useQuery(runLayoutQueryOptions(projectId, runId, x0, y0, size));
}
