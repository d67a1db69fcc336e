import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Upload } from '@shared/schemas/uploads';
import { api, apiUrl } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';

export function getUploads(projectId: number, signal?: AbortSignal): Promise<{ uploads: Upload[] }> {
  return api.get<{ uploads: Upload[] }>(`/projects/${projectId}/uploads`, { signal });
}

export function uploadsQueryOptions(projectId: number) {
  return queryOptions({
    queryKey: designKeys.uploads(projectId),
    queryFn: ({ signal }) => getUploads(projectId, signal),
    select: (data) => data.uploads,
  });
}

export function useUploads(projectId: number) {
  return useQuery(uploadsQueryOptions(projectId));
}

/** Where the browser fetches an upload's bytes (for thumbnails). */
export function uploadContentUrl(projectId: number, uploadId: number): string {
  return apiUrl(`/projects/${projectId}/uploads/${uploadId}/content`);
}
