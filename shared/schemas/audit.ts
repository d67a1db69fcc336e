import { z } from 'zod';

/** Every kind of security event the server records (README "Audit"). */
export const AUDIT_KINDS = [
  'sign-in',
  'sign-in-failed',
  'lockout',
  'password-changed',
  'password-reset-requested',
  'password-reset',
  'token-created',
  'token-revoked',
  'site-role-changed',
  'project-role-changed',
  'account-disabled',
  'account-enabled',
  'invitation-sent',
  'invitation-resent',
  'invitation-revoked',
  'invitation-accepted',
  'export-override',
] as const;
export type AuditKind = (typeof AUDIT_KINDS)[number];

export const listAuditQuerySchema = z.object({
  /** Events where this account acted or was acted on. */
  userId: z.coerce.number().int().positive().optional(),
  kind: z.enum(AUDIT_KINDS).optional(),
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(50),
});
export type ListAuditQuery = z.infer<typeof listAuditQuerySchema>;

/** Small facts of an event: names, roles, ids; never a password or a token. */
export type AuditDetail = Record<string, string | number | boolean | null>;

/** An account as the log shows it; name and email are null once the account has been deleted. */
export interface AuditPerson {
  id: number;
  name: string | null;
  email: string | null;
}

export interface AuditEvent {
  id: number;
  at: string;
  kind: AuditKind;
  actor: AuditPerson | null;
  subject: AuditPerson | null;
  project: { id: number; name: string | null } | null;
  /** The client's address as the server saw it (IPv4-mapped IPv6 written as IPv4). */
  address: string | null;
  detail: AuditDetail;
}

export interface AuditPage {
  events: AuditEvent[];
  total: number;
  page: number;
  pageSize: number;
}
