import type { QueryClient } from '@tanstack/react-query';
import { useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { PageHeader } from '@/components/layouts/page-header';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { EmptyState } from '@/components/ui/empty-state';
import { PageLoader } from '@/components/ui/spinner';
import { meQueryOptions, useCurrentUser } from '@/features/auth/api/get-me';
import {
  auditEventsQueryOptions,
  auditFiltersFromSearch,
  auditFiltersToSearch,
  useAuditEvents,
} from '@/features/admin/api/get-audit-events';
import type { AuditFilters } from '@/features/admin/api/query-keys';
import { usersQueryOptions, useUsers } from '@/features/admin/api/get-users';
import { AdminOnly } from '@/features/admin/components/admin-only';
import { AuditFilterControls } from '@/features/admin/components/audit-filters';
import { AuditPager, AuditTable } from '@/features/admin/components/audit-table';

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ request }: LoaderFunctionArgs) => {
    const me = await queryClient.ensureQueryData(meQueryOptions());
    if (me.user?.siteRole === 'admin') {
      const filters = auditFiltersFromSearch(new URL(request.url).searchParams);
      await Promise.all([queryClient.prefetchQuery(auditEventsQueryOptions(filters)), queryClient.prefetchQuery(usersQueryOptions())]);
    }
    return null;
  };

function AuditPage() {
  const [searchParams, setSearchParams] = useSearchParams();
  const filters = auditFiltersFromSearch(searchParams);
  const events = useAuditEvents(filters);
  const people = useUsers();
  const apply = (next: Partial<AuditFilters>) => setSearchParams(auditFiltersToSearch({ ...filters, ...next }), { replace: true });
  const narrowed = filters.userId !== null || filters.kind !== null || filters.page > 1;

  return (
    <>
      <title>Security log · Phasewright</title>
      <PageHeader
        title="Security log"
        description="Sign-ins, lockouts, password and role changes, access tokens, invitations and export overrides: who did what, to whom, when and from which address."
      />
      <Card>
        <AuditFilterControls filters={filters} people={people.data ?? []} onChange={apply} />
        {events.isPending ? (
          <PageLoader label="Loading the security log" />
        ) : events.isError ? (
          <Banner title="The security log did not load">
            <p>{events.error.message}</p>
            <Button variant="secondary" size="sm" className="mt-3" onClick={() => void events.refetch()}>
              Try again
            </Button>
          </Banner>
        ) : events.data.events.length > 0 ? (
          <>
            <AuditTable events={events.data.events} stale={events.isPlaceholderData} />
            <AuditPager page={events.data.page} pageSize={events.data.pageSize} total={events.data.total} onPage={(page) => apply({ page })} />
          </>
        ) : (
          <EmptyState
            title={narrowed ? 'Nothing matches' : 'No security events yet'}
            action={
              narrowed ? (
                <Button variant="secondary" onClick={() => apply({ userId: null, kind: null, page: 1 })}>
                  Show every event
                </Button>
              ) : null
            }
          >
            {narrowed
              ? 'No event of this kind or for this person on this page. Clear the filters to see the whole log.'
              : 'Events appear here as people sign in, change passwords, manage tokens, roles and invitations.'}
          </EmptyState>
        )}
      </Card>
    </>
  );
}

export default function AuditRoute() {
  const user = useCurrentUser();
  if (user.siteRole !== 'admin') return <AdminOnly />;
  return <AuditPage />;
}
