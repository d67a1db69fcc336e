import { queryOptions, useQuery } from '@tanstack/react-query';
import type { RevisionSummary } from '@shared/schemas/revisions';
import { api } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';

export function getRevisions(projectId: number, signal?: AbortSignal): Promise<{ revisions: RevisionSummary[] }> {
  return api.get<{ revisions: RevisionSummary[] }>(`/projects/${projectId}/revisions`, { signal });
}

/** Newest first, as the server sends them. */
export function revisionsQueryOptions(projectId: number) {
  return queryOptions({
    queryKey: designKeys.revisionList(projectId),
    queryFn: ({ signal }) => getRevisions(projectId, signal),
    select: (data) => data.revisions,
  });
}

export function useRevisions(projectId: number) {
  return useQuery(revisionsQueryOptions(projectId));
}
