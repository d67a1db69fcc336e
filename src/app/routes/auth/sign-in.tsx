import type { QueryClient } from '@tanstack/react-query';
import { Link, redirect, useNavigate, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { paths, safeRedirect } from '@/config/paths';
import { meQueryOptions, useMe } from '@/features/auth/api/get-me';
import { SignInForm } from '@/features/auth/components/sign-in-form';

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ request }: LoaderFunctionArgs) => {
    const me = await queryClient.ensureQueryData(meQueryOptions());
    if (me.user) throw redirect(safeRedirect(new URL(request.url).searchParams.get('redirectTo')));
    return null;
  };

export default function SignInRoute() {
  const navigate = useNavigate();
  const [searchParams] = useSearchParams();
  const redirectTo = safeRedirect(searchParams.get('redirectTo'));
  const { data } = useMe();

  return (
    <AuthLayout
      title="Sign in"
      intro="Phasewright is where your team designs metasurfaces that give each polarization its own wavefront."
      footer={
        data?.signupOpen ? (
          <>
            New here?{' '}
            <Link to={paths.auth.signUp.getHref()} className="rounded font-bold text-teal hover:underline">
              Create an account
            </Link>
          </>
        ) : (
          'No account yet? A site admin can send you an invitation.'
        )
      }
    >
      <title>Sign in · Phasewright</title>
      <SignInForm onSuccess={() => navigate(redirectTo, { replace: true })} />
    </AuthLayout>
  );
}
