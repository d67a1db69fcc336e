import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AccessToken, CreateAccessTokenInput } from '@shared/schemas/access';
import { api } from '@/lib/api-client';
import { sharingKeys } from '@/features/sharing/api/query-keys';

export function getAccessTokens(signal?: AbortSignal) {
  return api.get<{ accessTokens: AccessToken[] }>('/access-tokens', { signal });
}

export const accessTokensQueryOptions = () =>
  queryOptions({ queryKey: sharingKeys.accessTokens(), queryFn: ({ signal }) => getAccessTokens(signal), select: (d) => d.accessTokens });

export function useAccessTokens() {
  return useQuery(accessTokensQueryOptions());
}

export function useCreateAccessToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateAccessTokenInput) => api.post<{ accessToken: AccessToken; token: string }>('/access-tokens', input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: sharingKeys.accessTokens() }),
  });
}

export function useRevokeAccessToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api.delete<{ accessToken: AccessToken }>(`/access-tokens/${id}`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: sharingKeys.accessTokens() }),
  });
}
