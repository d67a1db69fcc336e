import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { AtomLibraryDetail } from '@shared/schemas/atom-libraries';
import { api } from '@/lib/api-client';
import { atomLibraryKeys } from '@/features/atom-libraries/api/query-keys';

/** Shares one's own personal library with the project (`shared: true`) or stops sharing it. */
export function shareAtomLibrary(projectId: number, libraryId: number, shared: boolean) {
  const url = `/projects/${projectId}/atom-libraries/${libraryId}/share`;
  return shared ? api.post<{ atomLibrary: AtomLibraryDetail }>(url) : api.delete<{ atomLibrary: AtomLibraryDetail }>(url);
}

export function useShareAtomLibrary(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ libraryId, shared }: { libraryId: number; shared: boolean }) => shareAtomLibrary(projectId, libraryId, shared),
    onSuccess: async ({ atomLibrary }, { libraryId }) => {
      queryClient.setQueryData(atomLibraryKeys.detail(projectId, libraryId), { atomLibrary });
      await queryClient.invalidateQueries({ queryKey: atomLibraryKeys.list(projectId) });
    },
  });
}
