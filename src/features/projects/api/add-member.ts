import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { AddMemberInput, Member } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function addMember(projectId: number, input: AddMemberInput): Promise<{ member: Member; invited: boolean }> {
  return api.post<{ member: Member; invited: boolean }>(`/projects/${projectId}/members`, input);
}

export function useAddMember(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: AddMemberInput) => addMember(projectId, input),
    onSuccess: async () => {
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: projectKeys.members(projectId) }),
        queryClient.invalidateQueries({ queryKey: projectKeys.invitations(projectId) }),
        queryClient.invalidateQueries({ queryKey: projectKeys.detail(projectId), exact: true }),
        queryClient.invalidateQueries({ queryKey: projectKeys.lists() }),
      ]);
    },
  });
}
