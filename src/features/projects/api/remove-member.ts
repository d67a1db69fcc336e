import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function removeMember(projectId: number, userId: number): Promise<void> {
  return api.delete(`/projects/${projectId}/members/${userId}`);
}

/** Removes a member; when `leaving` is set the user removed themselves and loses access to the project. */
export function useRemoveMember(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId }: { userId: number; leaving: boolean }) => removeMember(projectId, userId),
    onSuccess: async (_data, { leaving }) => {
      if (leaving) {
        await Promise.all([
          queryClient.invalidateQueries({ queryKey: projectKeys.detail(projectId), refetchType: 'none' }),
          queryClient.invalidateQueries({ queryKey: projectKeys.lists() }),
        ]);
        return;
      }
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: projectKeys.members(projectId) }),
        queryClient.invalidateQueries({ queryKey: projectKeys.invitations(projectId) }),
        queryClient.invalidateQueries({ queryKey: projectKeys.detail(projectId), exact: true }),
        queryClient.invalidateQueries({ queryKey: projectKeys.lists() }),
      ]);
    },
  });
}
