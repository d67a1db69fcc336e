import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { SharedRun, ShareLink } from '@shared/schemas/access';
import { api, apiUrl } from '@/lib/api-client';
import { sharingKeys } from '@/features/sharing/api/query-keys';

export function useShareLinks(projectId: number, runId: number) {
  return useQuery({
    queryKey: sharingKeys.shareLinks(projectId, runId),
    queryFn: ({ signal }) => api.get<{ shareLinks: ShareLink[] }>(`/projects/${projectId}/runs/${runId}/share-links`, { signal }),
    select: (d) => d.shareLinks,
  });
}

export function useCreateShareLink(projectId: number, runId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (expiresAt: string | null) =>
      api.post<{ shareLink: ShareLink; token: string; url: string }>(`/projects/${projectId}/runs/${runId}/share-links`, { expiresAt }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: sharingKeys.shareLinks(projectId, runId) }),
  });
}

export function useRevokeShareLink(projectId: number, runId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (linkId: number) => api.delete<{ shareLink: ShareLink }>(`/projects/${projectId}/share-links/${linkId}`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: sharingKeys.shareLinks(projectId, runId) }),
  });
}

export const sharedRunQueryOptions = (token: string) =>
  queryOptions({
    queryKey: sharingKeys.shared(token),
    queryFn: ({ signal }) => api.get<SharedRun>(`/shared/${encodeURIComponent(token)}`, { signal }),
    retry: false,
  });

export function useSharedRun(token: string) {
  return useQuery(sharedRunQueryOptions(token));
}

export function sharedArtifactHref(token: string, name: string) {
  return apiUrl(`/shared/${encodeURIComponent(token)}/artifacts/${encodeURIComponent(name)}`);
}

/** A preview's tile pyramid through the share link (artifact-href.ts `tilesHref`). */
export function sharedTilesHref(token: string, name: string) {
  return apiUrl(`/shared/${encodeURIComponent(token)}/tiles/${encodeURIComponent(name)}`);
}
