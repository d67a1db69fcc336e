import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';

export function deleteUpload(projectId: number, uploadId: number): Promise<void> {
  return api.delete(`/projects/${projectId}/uploads/${uploadId}`);
}

export function useDeleteUpload(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (uploadId: number) => deleteUpload(projectId, uploadId),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: designKeys.uploads(projectId) });
    },
  });
}
