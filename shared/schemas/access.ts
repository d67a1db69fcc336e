import { z } from 'zod';
import type { RunDetail } from './runs';

/** What a personal access token may do: `read` only GET/HEAD requests, `write` everything its owner may. */
export const TOKEN_SCOPES = ['read', 'write'] as const;
export type TokenScope = (typeof TOKEN_SCOPES)[number];

const futureDate = z.iso
  .datetime({ offset: true, message: 'Give the expiry as an ISO date-time, e.g. 2027-01-31T00:00:00Z' })
  .refine((value) => Date.parse(value) > Date.now(), 'The expiry must lie in the future')
  .refine((value) => Date.parse(value) < Date.now() + 5 * 366 * 24 * 3600 * 1000, 'The expiry must lie within five years');

export const createAccessTokenSchema = z.object({
  name: z.string().trim().min(1, 'Name the token (what script uses it?)').max(80, 'Use at most 80 characters'),
  scope: z.enum(TOKEN_SCOPES, 'Scope must be "read" or "write"'),
  expiresAt: futureDate.nullable().default(null),
  /** Asked again: a token outlives the session, so an unattended signed-in browser must not mint one. */
  currentPassword: z.string({ error: 'Enter your current password to create a token' }).min(1, 'Enter your current password to create a token').max(200),
});
export type CreateAccessTokenInput = z.input<typeof createAccessTokenSchema>;

export const accessTokenSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  scope: z.enum(TOKEN_SCOPES),
  /** The first characters of the token, to tell tokens apart. */
  prefix: z.string(),
  createdAt: z.string(),
  expiresAt: z.string().nullable(),
  lastUsedAt: z.string().nullable(),
  revokedAt: z.string().nullable(),
});
export type AccessToken = z.infer<typeof accessTokenSchema>;

/** Answer to creating a token: the only time the secret itself is sent. */
export const createdAccessTokenSchema = z.object({ accessToken: accessTokenSchema, token: z.string() });

export const createShareLinkSchema = z.object({ expiresAt: futureDate.nullable().default(null) });
export type CreateShareLinkInput = z.input<typeof createShareLinkSchema>;

export const shareLinkSchema = z.object({
  id: z.number().int(),
  runId: z.number().int(),
  prefix: z.string(),
  createdAt: z.string(),
  createdBy: z.object({ id: z.number().int(), name: z.string() }).nullable(),
  expiresAt: z.string().nullable(),
  revokedAt: z.string().nullable(),
});
export type ShareLink = z.infer<typeof shareLinkSchema>;

/** Answer to creating a share link: the only time the token (and so the full address) is sent. */
export const createdShareLinkSchema = z.object({ shareLink: shareLinkSchema, token: z.string(), url: z.string() });

/** What an outside reviewer sees through a share link: one run and the names around it, nothing else. */
export interface SharedRun {
  projectName: string;
  expiresAt: string | null;
  run: RunDetail;
}
