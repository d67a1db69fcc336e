import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PendingInvitation } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys } from '@/features/projects/api/query-keys';

export function getInvitations(projectId: number, signal?: AbortSignal): Promise<{ invitations: PendingInvitation[] }> {
  return api.get<{ invitations: PendingInvitation[] }>(`/projects/${projectId}/invitations`, { signal });
}

export function invitationsQueryOptions(projectId: number) {
  return queryOptions({
    queryKey: projectKeys.invitations(projectId),
    queryFn: ({ signal }) => getInvitations(projectId, signal),
    select: (data) => data.invitations,
  });
}

export function useInvitations(projectId: number) {
  return useQuery(invitationsQueryOptions(projectId));
}
