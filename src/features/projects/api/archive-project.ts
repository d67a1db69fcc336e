import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Project } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function archiveProject(projectId: number): Promise<{ project: Project }> {
  return api.post<{ project: Project }>(`/projects/${projectId}/archive`);
}

export function useArchiveProject(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => archiveProject(projectId),
    onSuccess: async (data) => {
      queryClient.setQueryData(projectKeys.detail(projectId), data);
      await queryClient.invalidateQueries({ queryKey: projectKeys.lists() });
    },
  });
}
