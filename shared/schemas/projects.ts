import { z } from 'zod';
import { PROJECT_ROLES } from '../roles';
import { emailSchema } from './auth';

export const projectNameSchema = z.string().trim().min(1, 'Enter a project name').max(120, 'Use at most 120 characters');
export const projectDescriptionSchema = z.string().trim().max(2000, 'Use at most 2000 characters');

export const createProjectSchema = z.object({
  name: projectNameSchema,
  description: projectDescriptionSchema.default(''),
});
export const updateProjectSchema = z
  .object({ name: projectNameSchema.optional(), description: projectDescriptionSchema.optional() })
  .refine((v) => v.name !== undefined || v.description !== undefined, 'Send name or description');

export const PROJECT_SORT_KEYS = ['name', 'updatedAt', 'createdAt', 'memberCount'] as const;
export const listProjectsQuerySchema = z.object({
  q: z.string().trim().max(120).optional(),
  status: z.enum(['active', 'archived', 'all']).default('active'),
  sort: z.enum(PROJECT_SORT_KEYS).default('updatedAt'),
  dir: z.enum(['asc', 'desc']).default('desc'),
});
export type ListProjectsQuery = z.infer<typeof listProjectsQuerySchema>;

export const addMemberSchema = z.object({ email: emailSchema, role: z.enum(PROJECT_ROLES) });
export const changeMemberRoleSchema = z.object({ role: z.enum(PROJECT_ROLES) });

export const projectSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  description: z.string(),
  archived: z.boolean(),
  createdAt: z.string(),
  updatedAt: z.string(),
  memberCount: z.number().int(),
  myRole: z.enum(PROJECT_ROLES).nullable(),
  createdBy: z.object({ id: z.number().int(), name: z.string() }).nullable(),
});
export type Project = z.infer<typeof projectSchema>;

export const memberSchema = z.object({
  userId: z.number().int(),
  name: z.string(),
  email: z.string(),
  role: z.enum(PROJECT_ROLES),
  addedAt: z.string(),
});
export type Member = z.infer<typeof memberSchema>;

export type CreateProjectInput = z.infer<typeof createProjectSchema>;
export type UpdateProjectInput = z.infer<typeof updateProjectSchema>;
export type AddMemberInput = z.infer<typeof addMemberSchema>;

/** A member whose account was created by an invitation that has not been accepted yet. */
export const pendingInvitationSchema = z.object({
  userId: z.number().int(),
  email: z.string(),
  role: z.enum(PROJECT_ROLES),
  invitedAt: z.string(),
  /** Until when the newest link works; null when no usable link is left (resend to issue one). */
  expiresAt: z.string().nullable(),
});
export type PendingInvitation = z.infer<typeof pendingInvitationSchema>;
