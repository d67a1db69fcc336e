import { z } from 'zod';
import { SITE_ROLES } from '../roles';

export const emailSchema = z.string().trim().toLowerCase().email('Enter a valid e-mail address').max(254);
export const passwordSchema = z
  .string()
  .min(10, 'Use at least 10 characters')
  .max(200, 'Use at most 200 characters');
export const displayNameSchema = z.string().trim().min(1, 'Enter a name').max(80, 'Use at most 80 characters');

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password').max(200),
});
/** Open sign-up: the password is chosen through the link mailed to the address (auth.service signUp). */
export const signUpSchema = z.object({ email: emailSchema, name: displayNameSchema });
export const changePasswordSchema = z.object({
  currentPassword: z.string().min(1, 'Enter your current password').max(200),
  newPassword: passwordSchema,
});
export const resetRequestSchema = z.object({ email: emailSchema });
export const tokenSchema = z.string().regex(/^[A-Za-z0-9_-]{32,128}$/, 'This link is malformed');
export const resetPasswordSchema = z.object({ token: tokenSchema, password: passwordSchema });
export const acceptInvitationSchema = z.object({ token: tokenSchema, name: displayNameSchema, password: passwordSchema });
export const updateProfileSchema = z.object({ name: displayNameSchema });

export const userSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  siteRole: z.enum(SITE_ROLES),
  disabled: z.boolean(),
  createdAt: z.string(),
  lastSignInAt: z.string().nullable(),
});
export type User = z.infer<typeof userSchema>;

export type SignInInput = z.infer<typeof signInSchema>;
export type ChangePasswordInput = z.infer<typeof changePasswordSchema>;
