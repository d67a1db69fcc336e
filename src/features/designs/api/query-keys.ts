export const designKeys = {
  all: ['designs'] as const,
  project: (projectId: number) => [...designKeys.all, projectId] as const,
  revisions: (projectId: number) => [...designKeys.project(projectId), 'revisions'] as const,
  revisionList: (projectId: number) => [...designKeys.revisions(projectId), 'list'] as const,
  revisionDetails: (projectId: number) => [...designKeys.revisions(projectId), 'detail'] as const,
  revision: (projectId: number, number: number) => [...designKeys.revisionDetails(projectId), number] as const,
  comparison: (projectId: number, a: number, b: number) => [...designKeys.revisions(projectId), 'compare', a, b] as const,
  uploads: (projectId: number) => [...designKeys.project(projectId), 'uploads'] as const,
  atomLibraries: (projectId: number) => [...designKeys.project(projectId), 'atom-libraries'] as const,
};
