import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Revision } from '@shared/schemas/revisions';
import { api } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';

export function getRevision(projectId: number, number: number, signal?: AbortSignal): Promise<{ revision: Revision }> {
  return api.get<{ revision: Revision }>(`/projects/${projectId}/revisions/${number}`, { signal });
}

/** A revision never changes once saved, so it stays fresh for the whole session. */
export function revisionQueryOptions(projectId: number, number: number) {
  return queryOptions({
    queryKey: designKeys.revision(projectId, number),
    queryFn: ({ signal }) => getRevision(projectId, number, signal),
    select: (data) => data.revision,
    staleTime: Infinity,
  });
}

export function useRevision(projectId: number, number: number | null) {
  return useQuery({ ...revisionQueryOptions(projectId, number ?? 0), enabled: number !== null });
}
