import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { replaceSession } from '@/features/auth/api/get-me';

export function signOut(): Promise<void> {
  return api.post<void>('/auth/sign-out');
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signOut,
    onSuccess: () => replaceSession(queryClient, null),
  });
}
