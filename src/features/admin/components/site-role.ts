import type { SiteRole } from '@shared/roles';

const names: Record<SiteRole, string> = { admin: 'Site admin', member: 'Member' };

export function siteRoleName(role: SiteRole): string {
  return names[role];
}
