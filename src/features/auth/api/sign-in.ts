import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { SignInInput, User } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';
import { replaceSession } from '@/features/auth/api/get-me';
import { authKeys } from '@/features/auth/api/query-keys';

export function signIn(input: SignInInput): Promise<{ user: User }> {
  return api.post<{ user: User }>('/auth/sign-in', input);
}

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationKey: authKeys.signIn(),
    mutationFn: signIn,
    onSuccess: ({ user }) => replaceSession(queryClient, user),
  });
}
