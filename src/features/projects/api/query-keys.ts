import type { ListProjectsQuery } from '@shared/schemas/projects';

export type ProjectListFilters = Required<Pick<ListProjectsQuery, 'status' | 'sort' | 'dir'>> & { q: string };

export const projectKeys = {
  all: ['projects'] as const,
  lists: () => [...projectKeys.all, 'list'] as const,
  list: (filters: ProjectListFilters) => [...projectKeys.lists(), filters] as const,
  details: () => [...projectKeys.all, 'detail'] as const,
  detail: (projectId: number) => [...projectKeys.details(), projectId] as const,
  members: (projectId: number) => [...projectKeys.detail(projectId), 'members'] as const,
  invitations: (projectId: number) => [...projectKeys.detail(projectId), 'invitations'] as const,
  activity: (projectId: number) => [...projectKeys.detail(projectId), 'activity'] as const,
};
