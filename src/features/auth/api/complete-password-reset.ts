import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { User } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';
import { replaceSession } from '@/features/auth/api/get-me';

export function completePasswordReset(input: { token: string; password: string }): Promise<{ user: User }> {
  return api.post<{ user: User }>('/auth/password-reset/complete', input);
}

export function useCompletePasswordReset() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: completePasswordReset,
    onSuccess: ({ user }) => replaceSession(queryClient, user),
  });
}
