import type { SiteRole } from '@shared/roles';
import type { AuditEvent, AuditKind } from '@shared/schemas/audit';
import { formatDate } from '@/lib/format';
import { siteRoleName } from '@/features/admin/components/site-role';

type Tone = 'teal' | 'ember' | 'danger' | 'muted';

export const AUDIT_KIND_INFO: Record<AuditKind, { label: string; tone: Tone }> = {
  'sign-in': { label: 'Signed in', tone: 'teal' },
  'sign-in-failed': { label: 'Sign-in refused', tone: 'danger' },
  lockout: { label: 'Locked out', tone: 'danger' },
  'password-changed': { label: 'Password changed', tone: 'ember' },
  'password-reset-requested': { label: 'Reset link asked for', tone: 'muted' },
  'password-reset': { label: 'Password set by reset link', tone: 'ember' },
  'token-created': { label: 'Access token created', tone: 'ember' },
  'token-revoked': { label: 'Access token revoked', tone: 'muted' },
  'site-role-changed': { label: 'Site role changed', tone: 'ember' },
  'project-role-changed': { label: 'Project role changed', tone: 'ember' },
  'account-disabled': { label: 'Account disabled', tone: 'danger' },
  'account-enabled': { label: 'Account enabled', tone: 'teal' },
  'invitation-sent': { label: 'Invitation sent', tone: 'muted' },
  'invitation-resent': { label: 'Invitation sent again', tone: 'muted' },
  'invitation-revoked': { label: 'Invitation withdrawn', tone: 'muted' },
  'invitation-accepted': { label: 'Invitation accepted', tone: 'teal' },
  'export-override': { label: 'Export override', tone: 'ember' },
};

const text = (value: unknown) => (value === null || value === undefined ? '' : String(value));
const projectRole = (role: unknown) => text(role).replace(/^./, (c) => c.toUpperCase());
const limiterNames: Record<string, string> = { '/sign-in': 'sign-in', '/password-reset/request': 'reset links' };

/** One line saying what happened beyond the kind, from the event's small detail record. */
export function describeAuditEvent(event: AuditEvent): string {
  const d = event.detail;
  switch (event.kind) {
    case 'sign-in-failed':
      return `Tried as ${text(d.email)}`;
    case 'lockout':
      return `${limiterNames[text(d.limiter)] ?? text(d.limiter)} refused after ${text(d.limit)} attempts for ${text(d.email) || 'an empty e-mail'}`;
    case 'token-created':
      return `“${text(d.name)}”, ${text(d.scope)} scope${d.expiresAt ? `, until ${formatDate(text(d.expiresAt))}` : ', no expiry'}`;
    case 'token-revoked':
      return `“${text(d.name)}”, ${text(d.scope)} scope`;
    case 'site-role-changed':
      return `${siteRoleName(d.from as SiteRole)} → ${siteRoleName(d.to as SiteRole)}`;
    case 'project-role-changed':
      if (d.from === null) return `Added as ${projectRole(d.to)}`;
      if (d.to === null) return `Removed (was ${projectRole(d.from)})`;
      return `${projectRole(d.from)} → ${projectRole(d.to)}`;
    case 'invitation-sent':
      return d.project ? `${text(d.email)}, to “${text(d.project)}”` : `${text(d.email)}, as ${siteRoleName(d.siteRole as SiteRole)}`;
    case 'invitation-resent':
    case 'invitation-revoked':
      return `${text(d.email)}, as ${projectRole(d.role)}`;
    case 'export-override':
      return `Run ${text(d.runId)}: ${text(d.violations)} design-rule violations let through — “${text(d.reason)}”`;
    default:
      return '';
  }
}
