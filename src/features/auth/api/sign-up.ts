import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { signUpSchema, User } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';
import { replaceSession } from '@/features/auth/api/get-me';

export type SignUpInput = z.output<typeof signUpSchema>;

export function signUp(input: SignUpInput): Promise<{ user: User }> {
  return api.post<{ user: User }>('/auth/sign-up', input);
}

export function useSignUp() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signUp,
    onSuccess: ({ user }) => replaceSession(queryClient, user),
  });
}
