import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Project, UpdateProjectInput } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function updateProject(projectId: number, input: UpdateProjectInput): Promise<{ project: Project }> {
  return api.patch<{ project: Project }>(`/projects/${projectId}`, input);
}

export function useUpdateProject(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateProjectInput) => updateProject(projectId, input),
    onSuccess: async (data) => {
      queryClient.setQueryData(projectKeys.detail(projectId), data);
      await queryClient.invalidateQueries({ queryKey: projectKeys.lists() });
    },
  });
}
