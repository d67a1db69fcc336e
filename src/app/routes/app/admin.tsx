import type { QueryClient } from '@tanstack/react-query';
import { PageHeader } from '@/components/layouts/page-header';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PageLoader } from '@/components/ui/spinner';
import { meQueryOptions, useCurrentUser } from '@/features/auth/api/get-me';
import { usersQueryOptions, useUsers } from '@/features/admin/api/get-users';
import { AdminOnly } from '@/features/admin/components/admin-only';
import { InviteUserForm } from '@/features/admin/components/invite-user-form';
import { UsersTable } from '@/features/admin/components/users-table';

export const clientLoader = (queryClient: QueryClient) => async () => {
  const me = await queryClient.ensureQueryData(meQueryOptions());
  if (me.user?.siteRole === 'admin') await queryClient.prefetchQuery(usersQueryOptions());
  return null;
};

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
      </div>
    </>
  );
}

export default function AdminRoute() {
  const user = useCurrentUser();
  if (user.siteRole !== 'admin') return <AdminOnly />;
  return <AdminPage currentUserId={user.id} />;
}
