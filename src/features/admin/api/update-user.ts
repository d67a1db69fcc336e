import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { UpdateUserInput } from '@shared/schemas/admin';
import type { User } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';
import { adminKeys } from '@/features/admin/api/query-keys';

export function updateUser(userId: number, input: UpdateUserInput): Promise<{ user: User }> {
  return api.patch<{ user: User }>(`/admin/users/${userId}`, input);
}

export function useUpdateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, input }: { userId: number; input: UpdateUserInput }) => updateUser(userId, input),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: adminKeys.users() });
    },
  });
}
