import { MutationCache, QueryCache, QueryClient, type QueryKey } from '@tanstack/react-query';
import { isApiError } from '@/lib/api-client';
import type { MeResponse } from '@/features/auth/api/get-me';
import { authKeys } from '@/features/auth/api/query-keys';
import { designKeys } from '@/features/designs/api/query-keys';
import { runKeys } from '@/features/runs/api/query-keys';

function shouldRetry(failureCount: number, error: unknown) {
  if (isApiError(error) && error.status >= 400 && error.status < 500) return false;
  return failureCount < 2;
}

function sameKey(a: QueryKey | undefined, b: QueryKey) {
  return a !== undefined && a.length === b.length && a.every((part, i) => part === b[i]);
}

/**
 * One client per app. A 401 anywhere but on the sign-in form itself means the session ended, so the
 * signed-in guard sends the user to sign in again.
 */
export function createAppQueryClient() {
  const sessionEnded = () =>
    queryClient.setQueryData<MeResponse>(authKeys.me(), (current) => (current ? { ...current, user: null } : current));
  const queryClient: QueryClient = new QueryClient({
    queryCache: new QueryCache({
      onError: (error, query) => {
        if (isApiError(error, 401) && !sameKey(query.queryKey, authKeys.me())) sessionEnded();
      },
    }),
    mutationCache: new MutationCache({
      // Starting a run (from any page) changes the run counts in the project's revision list.
      onSuccess: async (_data, _variables, _context, mutation) => {
        const key = mutation.options.mutationKey;
        const projectId = key?.[1];
        if (typeof projectId === 'number' && sameKey(key, runKeys.start(projectId))) {
          await queryClient.invalidateQueries({ queryKey: designKeys.revisionList(projectId) });
        }
      },
      onError: (error, _variables, _context, mutation) => {
        if (isApiError(error, 401) && !sameKey(mutation.options.mutationKey, authKeys.signIn())) sessionEnded();
      },
    }),
    defaultOptions: {
      queries: { staleTime: 30_000, retry: shouldRetry },
      mutations: { retry: false },
    },
  });
  return queryClient;
}
