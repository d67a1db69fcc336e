import type { QueryClient } from '@tanstack/react-query';
import { Link, redirect } from 'react-router-dom';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { Banner } from '@/components/ui/banner';
import { paths } from '@/config/paths';
import { meQueryOptions, useMe } from '@/features/auth/api/get-me';
import { SignUpForm } from '@/features/auth/components/sign-up-form';

export const clientLoader = (queryClient: QueryClient) => async () => {
  const me = await queryClient.ensureQueryData(meQueryOptions());
  if (me.user) throw redirect(paths.home.getHref());
  return null;
};

export default function SignUpRoute() {
  const { data } = useMe();
  const footer = (
    <>
      Already have an account?{' '}
      <Link to={paths.auth.signIn.getHref()} className="rounded font-bold text-teal hover:underline">
        Sign in
      </Link>
    </>
  );

  if (!data?.signupOpen) {
    return (
      <AuthLayout title="Accounts are by invitation" footer={footer}>
        <title>Create an account · Phasewright</title>
        <Banner tone="info">
          This Phasewright site does not take open sign-ups. Ask a site admin to invite you; the e-mail they send
          has a link to set up your account.
        </Banner>
      </AuthLayout>
    );
  }

  return (
    <AuthLayout title="Create an account" intro="Start a project and invite your team once you are in." footer={footer}>
      <title>Create an account · Phasewright</title>
      <SignUpForm />
    </AuthLayout>
  );
}
