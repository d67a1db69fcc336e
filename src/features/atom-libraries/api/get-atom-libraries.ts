import { queryOptions, useQuery } from '@tanstack/react-query';
import type { AtomLibrarySummary } from '@shared/schemas/atom-libraries';
import { api } from '@/lib/api-client';
import { atomLibraryKeys } from '@/features/atom-libraries/api/query-keys';

export function getAtomLibraries(projectId: number, signal?: AbortSignal): Promise<{ atomLibraries: AtomLibrarySummary[] }> {
  return api.get<{ atomLibraries: AtomLibrarySummary[] }>(`/projects/${projectId}/atom-libraries`, { signal });
}

export function atomLibrariesQueryOptions(projectId: number) {
  return queryOptions({
    queryKey: atomLibraryKeys.list(projectId),
    queryFn: ({ signal }) => getAtomLibraries(projectId, signal),
    select: (data) => data.atomLibraries,
  });
}

export function useAtomLibraries(projectId: number) {
  return useQuery(atomLibrariesQueryOptions(projectId));
}
