import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { User } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';
import { replaceSession } from '@/features/auth/api/get-me';

export function acceptInvitation(input: { token: string; name: string; password: string }): Promise<{ user: User }> {
  return api.post<{ user: User }>('/auth/invitation/accept', input);
}

export function useAcceptInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: acceptInvitation,
    onSuccess: ({ user }) => replaceSession(queryClient, user),
  });
}
