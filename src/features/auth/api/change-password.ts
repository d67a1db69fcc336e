import { useMutation } from '@tanstack/react-query';
import type { ChangePasswordInput } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';

/** `revokedTokens`: access tokens the change revoked; every other session of the account has ended too. */
export interface PasswordChanged {
  ok: true;
  revokedTokens: number;
}

export function changePassword(input: ChangePasswordInput): Promise<PasswordChanged> {
  return api.post<PasswordChanged>('/auth/password', input);
}

export function useChangePassword() {
  return useMutation({ mutationFn: changePassword });
}
