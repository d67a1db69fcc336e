import { useMutation } from '@tanstack/react-query';
import { api } from '@/lib/api-client';

export function requestPasswordReset(input: { email: string }): Promise<{ message: string }> {
  return api.post<{ message: string }>('/auth/password-reset/request', input);
}

export function useRequestPasswordReset() {
  return useMutation({ mutationFn: requestPasswordReset });
}
