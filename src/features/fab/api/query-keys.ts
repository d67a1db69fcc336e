export const fabKeys = {
  all: ['fab'] as const,
  project: (projectId: number) => [...fabKeys.all, projectId] as const,
  designRules: (projectId: number) => [...fabKeys.project(projectId), 'design-rules'] as const,
  run: (projectId: number, runId: number) => [...fabKeys.project(projectId), 'run', runId] as const,
  designCheck: (projectId: number, runId: number) => [...fabKeys.run(projectId, runId), 'design-check'] as const,
  report: (projectId: number, runId: number) => [...fabKeys.run(projectId, runId), 'report'] as const,
  layout: (projectId: number, runId: number, x0: number, y0: number, size: number) => [...fabKeys.run(projectId, runId), 'layout', { x0, y0, size }] as const,
};
