export const reviewKeys = {
  all: ['review'] as const,
  threads: (projectId: number, runId: number) => [...reviewKeys.all, 'threads', projectId, runId] as const,
};
