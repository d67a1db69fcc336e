import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CreateProjectInput, Project } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function createProject(input: CreateProjectInput): Promise<{ project: Project }> {
  return api.post<{ project: Project }>('/projects', input);
}

export function useCreateProject() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createProject,
    onSuccess: async (data) => {
      queryClient.setQueryData(projectKeys.detail(data.project.id), data);
      await queryClient.invalidateQueries({ queryKey: projectKeys.lists() });
    },
  });
}
