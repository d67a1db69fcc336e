import { z } from 'zod';

/** Longest comment body, in characters. */
export const COMMENT_MAX_LENGTH = 4000;

export const commentBodySchema = z
  .string({ error: 'Write the comment as text' })
  .max(COMMENT_MAX_LENGTH, `Use at most ${COMMENT_MAX_LENGTH} characters`)
  .refine((s) => s.trim().length > 0, 'Write something before sending');

/** A point of a preview image, as fractions 0…1 of its width (x, from the left) and height (y, from the top). */
const fraction = (axis: string) =>
  z.number({ error: `${axis} must be a number from 0 to 1` }).min(0, `${axis} must be from 0 to 1`).max(1, `${axis} must be from 0 to 1`);

export const createThreadSchema = z.object({
  artifact: z.string({ error: 'Name the preview image (artifact)' }).min(1, 'Name the preview image (artifact)').max(100),
  x: fraction('x'),
  y: fraction('y'),
  body: commentBodySchema,
});
export type CreateThreadInput = z.infer<typeof createThreadSchema>;

export const createCommentSchema = z.object({ body: commentBodySchema });
export const updateCommentSchema = z.object({ body: commentBodySchema });

export const NOTIFICATION_KINDS = ['mention', 'reply', 'run-finished'] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];
export const NOTIFICATION_KIND_LABELS: Record<NotificationKind, string> = {
  mention: 'Someone mentions me in a comment',
  reply: 'Someone replies in a thread I am in',
  'run-finished': 'A run I started finishes or fails',
};

export const notificationPreferencesSchema = z.object({
  email: z.object({ mention: z.boolean(), reply: z.boolean(), 'run-finished': z.boolean() }).strict(),
});
export type NotificationPreferences = z.infer<typeof notificationPreferencesSchema>;

export const listNotificationsQuerySchema = z.object({ unread: z.enum(['true', 'false']).optional() });

const person = z.object({ id: z.number().int(), name: z.string() });

export const reviewCommentSchema = z.object({
  id: z.number().int(),
  threadId: z.number().int(),
  author: person.nullable(),
  body: z.string(),
  mentions: z.array(z.number().int()),
  createdAt: z.string(),
  editedAt: z.string().nullable(),
});
export type ReviewComment = z.infer<typeof reviewCommentSchema>;

export const reviewThreadSchema = z.object({
  id: z.number().int(),
  runId: z.number().int(),
  revisionId: z.number().int(),
  artifact: z.string(),
  x: z.number(),
  y: z.number(),
  createdBy: person.nullable(),
  createdAt: z.string(),
  resolvedAt: z.string().nullable(),
  resolvedBy: person.nullable(),
  comments: z.array(reviewCommentSchema),
});
export type ReviewThread = z.infer<typeof reviewThreadSchema>;

export const notificationSchema = z.object({
  id: z.number().int(),
  kind: z.enum(NOTIFICATION_KINDS),
  projectId: z.number().int(),
  projectName: z.string(),
  runId: z.number().int().nullable(),
  threadId: z.number().int().nullable(),
  actor: person.nullable(),
  text: z.string(),
  createdAt: z.string(),
  readAt: z.string().nullable(),
});
export type Notification = z.infer<typeof notificationSchema>;

export const ACTIVITY_KINDS = [
  'revision-saved',
  'run-started',
  'run-finished',
  'run-failed',
  'run-cancelled',
  'comment',
  'thread-resolved',
  'thread-reopened',
  'member-added',
  'member-role-changed',
  'member-removed',
  'export',
] as const;
export type ActivityKind = (typeof ACTIVITY_KINDS)[number];

export const activityItemSchema = z.object({
  kind: z.enum(ACTIVITY_KINDS),
  at: z.string(),
  actor: person.nullable(),
  text: z.string(),
  runId: z.number().int().nullable(),
  threadId: z.number().int().nullable(),
  revisionNumber: z.number().int().nullable(),
});
export type ActivityItem = z.infer<typeof activityItemSchema>;
