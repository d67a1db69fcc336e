export const atomLibraryKeys = {
  all: ['atom-libraries'] as const,
  project: (projectId: number) => [...atomLibraryKeys.all, projectId] as const,
  list: (projectId: number) => [...atomLibraryKeys.project(projectId), 'list'] as const,
  details: (projectId: number) => [...atomLibraryKeys.project(projectId), 'detail'] as const,
  detail: (projectId: number, libraryId: number | 'demo') => [...atomLibraryKeys.details(projectId), libraryId] as const,
};
