import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { PendingInvitation } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function resendInvitation(projectId: number, userId: number): Promise<{ invitation: PendingInvitation }> {
  return api.post<{ invitation: PendingInvitation }>(`/projects/${projectId}/invitations/${userId}/resend`);
}

export function useResendInvitation(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (userId: number) => resendInvitation(projectId, userId),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: projectKeys.invitations(projectId) });
    },
  });
}
