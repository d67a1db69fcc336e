import { queryOptions, useQuery } from '@tanstack/react-query';
import type { User } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';
import { adminKeys } from '@/features/admin/api/query-keys';

export function getUsers(signal?: AbortSignal): Promise<{ users: User[] }> {
  return api.get<{ users: User[] }>('/admin/users', { signal });
}

export function usersQueryOptions() {
  return queryOptions({
    queryKey: adminKeys.users(),
    queryFn: ({ signal }) => getUsers(signal),
    select: (data) => data.users,
  });
}

export function useUsers() {
  return useQuery(usersQueryOptions());
}
