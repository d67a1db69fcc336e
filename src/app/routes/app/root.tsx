import type { QueryClient } from '@tanstack/react-query';
import { Navigate, Outlet, redirect, useLocation, useNavigate, type LoaderFunctionArgs } from 'react-router-dom';
import { AppShell } from '@/components/layouts/app-shell';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { meQueryOptions, useMe } from '@/features/auth/api/get-me';
import { useSignOut } from '@/features/auth/api/sign-out';
import { NotificationBell } from '@/features/notifications/components/notification-bell';

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ request }: LoaderFunctionArgs) => {
    const me = await queryClient.ensureQueryData(meQueryOptions());
    if (!me.user) {
      const url = new URL(request.url);
      throw redirect(paths.auth.signIn.getHref(`${url.pathname}${url.search}`));
    }
    return null;
  };

export default function SignedInRoot() {
  const { data, isPending } = useMe();
  const location = useLocation();
  const navigate = useNavigate();
  const signOut = useSignOut();

  if (isPending) return <PageLoader />;
  const user = data?.user;
  if (!user) {
    const here = signOut.isSuccess ? null : `${location.pathname}${location.search}`;
    return <Navigate to={paths.auth.signIn.getHref(here)} replace />;
  }

  return (
    <AppShell
      userName={user.name}
      userEmail={user.email}
      isAdmin={user.siteRole === 'admin'}
      headerExtra={<NotificationBell />}
      signingOut={signOut.isPending}
      onSignOut={() => signOut.mutate(undefined, { onSuccess: () => navigate(paths.auth.signIn.getHref(), { replace: true }) })}
    >
      <Outlet />
    </AppShell>
  );
}
