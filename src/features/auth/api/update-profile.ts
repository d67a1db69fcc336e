import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { User } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';
import type { MeResponse } from '@/features/auth/api/get-me';
import { authKeys } from '@/features/auth/api/query-keys';

export function updateProfile(input: { name: string }): Promise<{ user: User }> {
  return api.patch<{ user: User }>('/auth/profile', input);
}

export function useUpdateProfile() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: updateProfile,
    onSuccess: ({ user }) => {
      queryClient.setQueryData<MeResponse>(authKeys.me(), (current) => (current ? { ...current, user } : current));
    },
  });
}
