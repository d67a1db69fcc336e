import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { LibrarySpec } from '@shared/optics/library-builder';
import type { LibraryBuild, LibraryBuildEstimate, LibraryBuildResult, LibraryBuildRequest } from '@shared/schemas/library-builds';
import { api } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';
import { atomLibraryKeys } from '@/features/atom-libraries/api/query-keys';
import { BUILD_POLL_MS, libraryBuildKeys } from '@/features/library-builds/api/query-keys';

const base = (projectId: number) => `/projects/${projectId}/library-builds`;

export const isBuildActive = (build: Pick<LibraryBuild, 'status'>) => build.status === 'queued' || build.status === 'running';

export function libraryBuildsQueryOptions(projectId: number) {
  return queryOptions({
    queryKey: libraryBuildKeys.list(projectId),
    queryFn: ({ signal }) => api.get<{ builds: LibraryBuild[] }>(base(projectId), { signal }),
    select: (data) => data.builds,
    refetchInterval: (query) => (query.state.data?.builds.some(isBuildActive) ? BUILD_POLL_MS * 3 : false),
  });
}

export function useLibraryBuilds(projectId: number) {
  return useQuery(libraryBuildsQueryOptions(projectId));
}

export function libraryBuildQueryOptions(projectId: number, buildId: number) {
  return queryOptions({
    queryKey: libraryBuildKeys.detail(projectId, buildId),
    queryFn: ({ signal }) => api.get<{ build: LibraryBuild; result: LibraryBuildResult | null }>(`${base(projectId)}/${buildId}`, { signal }),
    refetchInterval: (query) => {
      const build = query.state.data?.build;
      return build && isBuildActive(build) ? BUILD_POLL_MS : false;
    },
  });
}

export function useLibraryBuild(projectId: number, buildId: number) {
  return useQuery(libraryBuildQueryOptions(projectId, buildId));
}

/** The cost of a spec (atoms × time per atom) and its lattice-diffraction warnings; null spec: not asked. */
export function useLibraryBuildEstimate(projectId: number, spec: LibrarySpec | null) {
  return useQuery({
    queryKey: libraryBuildKeys.estimate(projectId, spec),
    queryFn: ({ signal }) => api.post<LibraryBuildEstimate>(`${base(projectId)}/estimate`, { spec }, { signal }),
    enabled: spec !== null,
    placeholderData: keepPreviousData,
    retry: false,
    staleTime: 60_000,
  });
}

export function useStartLibraryBuild(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: LibraryBuildRequest) => api.post<{ build: LibraryBuild }>(base(projectId), body),
    onSuccess: async ({ build }) => {
      queryClient.setQueryData(libraryBuildKeys.detail(projectId, build.id), { build, result: null });
      await queryClient.invalidateQueries({ queryKey: libraryBuildKeys.list(projectId) });
    },
  });
}

export function useCancelLibraryBuild(projectId: number, buildId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<{ build: LibraryBuild }>(`${base(projectId)}/${buildId}/cancel`),
    onSuccess: async () => {
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: libraryBuildKeys.detail(projectId, buildId) }),
        queryClient.invalidateQueries({ queryKey: libraryBuildKeys.list(projectId) }),
      ]);
    },
  });
}

/** Once a build has stored its library, the project's library lists are out of date. */
export function useRefreshLibrariesWhenBuilt(projectId: number) {
  const queryClient = useQueryClient();
  return () =>
    Promise.all([
      queryClient.invalidateQueries({ queryKey: atomLibraryKeys.project(projectId) }),
      queryClient.invalidateQueries({ queryKey: designKeys.atomLibraries(projectId) }),
    ]);
}
