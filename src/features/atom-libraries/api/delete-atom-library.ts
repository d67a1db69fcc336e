import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { atomLibraryKeys } from '@/features/atom-libraries/api/query-keys';

export function deleteAtomLibrary(projectId: number, libraryId: number): Promise<void> {
  return api.delete(`/projects/${projectId}/atom-libraries/${libraryId}`);
}

export function useDeleteAtomLibrary(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (libraryId: number) => deleteAtomLibrary(projectId, libraryId),
    onSuccess: async (_data, libraryId) => {
      queryClient.removeQueries({ queryKey: atomLibraryKeys.detail(projectId, libraryId) });
      await queryClient.invalidateQueries({ queryKey: atomLibraryKeys.list(projectId) });
    },
  });
}
