import type { AuditKind } from '@shared/schemas/audit';

export interface AuditFilters {
  userId: number | null;
  kind: AuditKind | null;
  page: number;
}

export const adminKeys = {
  all: ['admin'] as const,
  users: () => [...adminKeys.all, 'users'] as const,
  audit: () => [...adminKeys.all, 'audit'] as const,
  auditPage: (filters: AuditFilters) => [...adminKeys.audit(), filters] as const,
};
