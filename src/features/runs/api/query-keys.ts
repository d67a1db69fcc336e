import type { ListRunsQuery } from '@shared/schemas/runs';

export type RunListFilters = Required<Pick<ListRunsQuery, 'status' | 'sort' | 'dir'>> & { revision: number | null };

export const runKeys = {
  all: ['runs'] as const,
  project: (projectId: number) => [...runKeys.all, projectId] as const,
  lists: (projectId: number) => [...runKeys.project(projectId), 'list'] as const,
  list: (projectId: number, filters: RunListFilters) => [...runKeys.lists(projectId), filters] as const,
  details: (projectId: number) => [...runKeys.project(projectId), 'detail'] as const,
  detail: (projectId: number, runId: number) => [...runKeys.details(projectId), runId] as const,
  start: (projectId: number) => [...runKeys.project(projectId), 'start'] as const,
  comparison: (projectId: number, a: number, b: number) => [...runKeys.project(projectId), 'comparison', a, b] as const,
  tolerance: (projectId: number, runId: number) => [...runKeys.project(projectId), 'tolerance', runId] as const,
  artifacts: (projectId: number, runId: number) => [...runKeys.project(projectId), 'artifact', runId] as const,
  artifact: (projectId: number, runId: number, name: string) => [...runKeys.artifacts(projectId, runId), name] as const,
};
