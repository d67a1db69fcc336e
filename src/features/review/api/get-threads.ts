import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ReviewThread } from '@shared/schemas/review';
import { api } from '@/lib/api-client';
import { reviewKeys } from '@/features/review/api/query-keys';

export function getThreads(projectId: number, runId: number, signal?: AbortSignal): Promise<{ threads: ReviewThread[] }> {
  return api.get<{ threads: ReviewThread[] }>(`/projects/${projectId}/runs/${runId}/threads`, { signal });
}

export function threadsQueryOptions(projectId: number, runId: number) {
  return queryOptions({
    queryKey: reviewKeys.threads(projectId, runId),
    queryFn: ({ signal }) => getThreads(projectId, runId, signal),
    select: (data) => data.threads,
    refetchInterval: 30_000,
  });
}

export function useThreads(projectId: number, runId: number) {
  return useQuery(threadsQueryOptions(projectId, runId));
}
