import { queryOptions, useQuery } from '@tanstack/react-query';
import type { AtomLibrarySummary } from '@shared/schemas/atom-libraries';
import { api } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';

/** The atom libraries a design of this project may choose from (the demo library first). */
export function getDesignAtomLibraries(projectId: number, signal?: AbortSignal): Promise<{ atomLibraries: AtomLibrarySummary[] }> {
  return api.get<{ atomLibraries: AtomLibrarySummary[] }>(`/projects/${projectId}/atom-libraries`, { signal });
}

export function designAtomLibrariesQueryOptions(projectId: number) {
  return queryOptions({
    queryKey: designKeys.atomLibraries(projectId),
    queryFn: ({ signal }) => getDesignAtomLibraries(projectId, signal),
    select: (data) => data.atomLibraries,
  });
}

export function useDesignAtomLibraries(projectId: number) {
  return useQuery(designAtomLibrariesQueryOptions(projectId));
}
