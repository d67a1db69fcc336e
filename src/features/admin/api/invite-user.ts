import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CreateUserInput } from '@shared/schemas/admin';
import type { User } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';
import { adminKeys } from '@/features/admin/api/query-keys';

export function inviteUser(input: CreateUserInput): Promise<{ user: User }> {
  return api.post<{ user: User }>('/admin/users', input);
}

export function useInviteUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: inviteUser,
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: adminKeys.users() });
    },
  });
}
