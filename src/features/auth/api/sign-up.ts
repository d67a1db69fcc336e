import { useMutation } from '@tanstack/react-query';
import type { z } from 'zod';
import type { signUpSchema } from '@shared/schemas/auth';
import { api } from '@/lib/api-client';

export type SignUpInput = z.output<typeof signUpSchema>;

/** Asks for an account; the answer is the same for every address, and the link to finish arrives by e-mail. */
export function signUp(input: SignUpInput): Promise<{ message: string }> {
  return api.post<{ message: string }>('/auth/sign-up', input);
}

export function useSignUp() {
  return useMutation({ mutationFn: signUp });
}
