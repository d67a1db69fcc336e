import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { AUDIT_KINDS, type AuditKind, type AuditPage } from '@shared/schemas/audit';
import { api } from '@/lib/api-client';
import { adminKeys, type AuditFilters } from '@/features/admin/api/query-keys';

export const AUDIT_PAGE_SIZE = 50;

const WHOLE_NUMBER = /^[1-9][0-9]{0,8}$/;

/** Reads the audit filters from the address bar, so a filtered page can be bookmarked and shared. */
export function auditFiltersFromSearch(search: URLSearchParams): AuditFilters {
  const userId = search.get('person');
  const kind = search.get('kind');
  const page = search.get('page');
  return {
    userId: userId && WHOLE_NUMBER.test(userId) ? Number(userId) : null,
    kind: kind && (AUDIT_KINDS as readonly string[]).includes(kind) ? (kind as AuditKind) : null,
    page: page && WHOLE_NUMBER.test(page) ? Number(page) : 1,
  };
}

export function auditFiltersToSearch(filters: AuditFilters): URLSearchParams {
  const search = new URLSearchParams();
  if (filters.userId !== null) search.set('person', String(filters.userId));
  if (filters.kind !== null) search.set('kind', filters.kind);
  if (filters.page > 1) search.set('page', String(filters.page));
  return search;
}

export function getAuditEvents(filters: AuditFilters, signal?: AbortSignal): Promise<AuditPage> {
  return api.get<AuditPage>('/admin/audit', {
    params: { userId: filters.userId, kind: filters.kind, page: filters.page, pageSize: AUDIT_PAGE_SIZE },
    signal,
  });
}

export function auditEventsQueryOptions(filters: AuditFilters) {
  return queryOptions({
    queryKey: adminKeys.auditPage(filters),
    queryFn: ({ signal }) => getAuditEvents(filters, signal),
    placeholderData: keepPreviousData,
    staleTime: 10_000,
  });
}

export function useAuditEvents(filters: AuditFilters) {
  return useQuery(auditEventsQueryOptions(filters));
}
