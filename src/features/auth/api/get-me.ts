import { queryOptions, useQuery, type QueryClient } from '@tanstack/react-query';
import type { User } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';
import { authKeys } from '@/features/auth/api/query-keys';

export interface MeResponse {
  user: User | null;
  signupOpen: boolean;
  /** This server's upload limits (its UPLOAD_MAX_MIB and UPLOAD_MAX_SIDE) and memory budget of one run (RUN_MEMORY_BUDGET_MB). */
  limits?: { uploadMaxBytes: number; uploadMaxSide: number; runMemoryBudgetMb?: number };
}

export function getMe({ signal }: { signal?: AbortSignal } = {}): Promise<MeResponse> {
  return api.get<MeResponse>('/auth/me', { signal });
}

export function meQueryOptions() {
  return queryOptions({
    queryKey: authKeys.me(),
    queryFn: ({ signal }) => getMe({ signal }),
    staleTime: 5 * 60_000,
  });
}

export function useMe() {
  return useQuery(meQueryOptions());
}

/** The signed-in user; only for screens behind the sign-in guard, which has already loaded it. */
export function useCurrentUser(): User {
  const { data } = useMe();
  if (!data?.user) throw new Error('useCurrentUser() is only for signed-in screens');
  return data.user;
}

/**
 * A new session means a different person may be looking: drop everything cached for the old one,
 * then record who is signed in now.
 */
export function replaceSession(queryClient: QueryClient, user: User | null) {
  const previous = queryClient.getQueryData<MeResponse>(authKeys.me());
  queryClient.clear();
  if (previous) queryClient.setQueryData<MeResponse>(authKeys.me(), { ...previous, user });
  else void queryClient.invalidateQueries({ queryKey: authKeys.me() });
}
