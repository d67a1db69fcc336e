export const libraryBuildKeys = {
  all: ['library-builds'] as const,
  project: (projectId: number) => [...libraryBuildKeys.all, projectId] as const,
  list: (projectId: number) => [...libraryBuildKeys.project(projectId), 'list'] as const,
  detail: (projectId: number, buildId: number) => [...libraryBuildKeys.project(projectId), 'detail', buildId] as const,
  estimate: (projectId: number, body: unknown) => [...libraryBuildKeys.project(projectId), 'estimate', body] as const,
};

/** How often a queued or running build is asked for its progress, ms. */
export const BUILD_POLL_MS = 1000;
