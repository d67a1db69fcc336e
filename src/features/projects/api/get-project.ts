import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Project } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function getProject(projectId: number, signal?: AbortSignal): Promise<{ project: Project }> {
  return api.get<{ project: Project }>(`/projects/${projectId}`, { signal });
}

export function projectQueryOptions(projectId: number) {
  return queryOptions({
    queryKey: projectKeys.detail(projectId),
    queryFn: ({ signal }) => getProject(projectId, signal),
    select: (data) => data.project,
    retryOnMount: false,
  });
}

export function useProject(projectId: number | null) {
  return useQuery({ ...projectQueryOptions(projectId ?? 0), enabled: projectId !== null });
}
