import { useMutation } from '@tanstack/react-query';
import type { ChangePasswordInput } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';

export function changePassword(input: ChangePasswordInput): Promise<{ ok: true }> {
  return api.post<{ ok: true }>('/auth/password', input);
}

export function useChangePassword() {
  return useMutation({ mutationFn: changePassword });
}
