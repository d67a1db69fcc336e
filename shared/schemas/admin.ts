import { z } from 'zod';
import { SITE_ROLES } from '../roles';
import { displayNameSchema, emailSchema } from './auth';

export const createUserSchema = z.object({
  email: emailSchema,
  name: displayNameSchema,
  siteRole: z.enum(SITE_ROLES).default('member'),
});
export const updateUserSchema = z
  .object({ siteRole: z.enum(SITE_ROLES).optional(), disabled: z.boolean().optional() })
  .refine((v) => v.siteRole !== undefined || v.disabled !== undefined, 'Send siteRole or disabled');

export type CreateUserInput = z.infer<typeof createUserSchema>;
export type UpdateUserInput = z.infer<typeof updateUserSchema>;
