import type { QueryClient } from '@tanstack/react-query';
import { PageHeader } from '@/components/layouts/page-header';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PageLoader } from '@/components/ui/spinner';
import { meQueryOptions, useCurrentUser } from '@/features/auth/api/get-me';
import { useRunQueue } from '@/features/admin/api/get-run-queue';
import { usersQueryOptions, useUsers } from '@/features/admin/api/get-users';
import { AdminOnly } from '@/features/admin/components/admin-only';
import { InviteUserForm } from '@/features/admin/components/invite-user-form';
import { UsersTable } from '@/features/admin/components/users-table';

export const clientLoader = (queryClient: QueryClient) => async () => {
  const me = await queryClient.ensureQueryData(meQueryOptions());
  if (me.user?.siteRole === 'admin') await queryClient.prefetchQuery(usersQueryOptions());
  return null;
};

/** Where runs execute and how many wait: from the queue engine itself (BullMQ's counts in Redis mode). */
function RunQueueCard() {
  const queue = useRunQueue();
  if (!queue.data) return null;
  const { engine, state, counts } = queue.data;
  return (
    <Card
      title="Run queue"
      description={engine === 'redis' ? 'Runs execute on worker processes taking them from Redis.' : `Runs execute on ${state.threads} thread(s) of this server.`}
    >
      <dl className="grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-3">
        {Object.entries(counts ?? { running: state.running, waiting: state.waiting }).map(([name, count]) => (
          <div key={name} className="flex justify-between gap-3">
            <dt className="text-ink-soft">{name}</dt>
            <dd className="tabular-nums">{count}</dd>
          </div>
        ))}
      </dl>
      {engine === 'redis' && !counts ? <p className="mt-2 text-sm">Redis does not answer; the counts are unknown.</p> : null}
    </Card>
  );
}

function AdminPage({ currentUserId }: { currentUserId: number }) {
  const users = useUsers();
  return (
    <>
      <title>Admin · Phasewright</title>
      <PageHeader
        title="People and access"
        description="Invite colleagues, choose who runs the site, and switch off accounts that should no longer sign in."
      />
      <div className="grid gap-6">
        <Card
          title="Invite someone"
          description="We create the account and e-mail a link; they choose their own password when they open it."
        >
          <InviteUserForm />
        </Card>
        <Card title="Accounts">
          {users.isPending ? (
            <PageLoader label="Loading accounts" />
          ) : users.isError ? (
            <Banner title="The account list did not load">
              <p>{users.error.message}</p>
              <Button variant="secondary" size="sm" className="mt-3" onClick={() => void users.refetch()}>
                Try again
              </Button>
            </Banner>
          ) : (
            <UsersTable users={users.data} currentUserId={currentUserId} />
          )}
        </Card>
        <RunQueueCard />
      </div>
    </>
  );
}

export default function AdminRoute() {
  const user = useCurrentUser();
  if (user.siteRole !== 'admin') return <AdminOnly />;
  return <AdminPage currentUserId={user.id} />;
}
