import { queryOptions, useQuery } from '@tanstack/react-query';
import type { AtomLibraryDetail } from '@shared/schemas/atom-libraries';
import { api, apiUrl } from '@/lib/api-client';
import { atomLibraryKeys } from '@/features/atom-libraries/api/query-keys';

export function getAtomLibrary(projectId: number, libraryId: number | 'demo', signal?: AbortSignal): Promise<{ atomLibrary: AtomLibraryDetail }> {
  return api.get<{ atomLibrary: AtomLibraryDetail }>(`/projects/${projectId}/atom-libraries/${libraryId}`, { signal });
}

export function atomLibraryQueryOptions(projectId: number, libraryId: number | 'demo') {
  return queryOptions({
    queryKey: atomLibraryKeys.detail(projectId, libraryId),
    queryFn: ({ signal }) => getAtomLibrary(projectId, libraryId, signal),
    select: (data) => data.atomLibrary,
  });
}

export function useAtomLibrary(projectId: number, libraryId: number | 'demo') {
  return useQuery(atomLibraryQueryOptions(projectId, libraryId));
}

/** Where the browser downloads the library as CSV. */
export function atomLibraryCsvHref(projectId: number, libraryId: number | 'demo'): string {
  return apiUrl(`/projects/${projectId}/atom-libraries/${libraryId}/csv`);
}

/** 'demo', a stored library's number, or null for anything else in the address. */
export function parseLibraryId(value: string | undefined): number | 'demo' | null {
  if (value === 'demo') return 'demo';
  return value && /^[1-9][0-9]{0,9}$/.test(value) ? Number(value) : null;
}
