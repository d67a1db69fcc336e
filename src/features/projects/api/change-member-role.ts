import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ProjectRole } from '@shared/roles';
import type { Member } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export interface ChangeMemberRoleInput {
  userId: number;
  role: ProjectRole;
}

export function changeMemberRole(projectId: number, { userId, role }: ChangeMemberRoleInput): Promise<{ member: Member }> {
  return api.patch<{ member: Member }>(`/projects/${projectId}/members/${userId}`, { role });
}

export function useChangeMemberRole(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ChangeMemberRoleInput) => changeMemberRole(projectId, input),
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
