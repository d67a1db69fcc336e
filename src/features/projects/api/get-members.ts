import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Member } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function getMembers(projectId: number, signal?: AbortSignal): Promise<{ members: Member[] }> {
  return api.get<{ members: Member[] }>(`/projects/${projectId}/members`, { signal });
}

export function membersQueryOptions(projectId: number) {
  return queryOptions({
    queryKey: projectKeys.members(projectId),
    queryFn: ({ signal }) => getMembers(projectId, signal),
    select: (data) => data.members,
  });
}

export function useMembers(projectId: number) {
  return useQuery(membersQueryOptions(projectId));
}
