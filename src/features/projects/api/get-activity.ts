import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ActivityItem } from '@shared/schemas/review';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function getActivity(projectId: number, signal?: AbortSignal): Promise<{ activity: ActivityItem[] }> {
  return api.get<{ activity: ActivityItem[] }>(`/projects/${projectId}/activity`, { signal });
}

export function activityQueryOptions(projectId: number) {
  return queryOptions({
    queryKey: projectKeys.activity(projectId),
    queryFn: ({ signal }) => getActivity(projectId, signal),
    select: (data) => data.activity,
  });
}

export function useActivity(projectId: number) {
  return useQuery(activityQueryOptions(projectId));
}
