import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { tokenSchema } from '@shared/schemas/auth';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { Banner } from '@/components/ui/banner';
import { paths } from '@/config/paths';
import { useMe } from '@/features/auth/api/get-me';
import { AcceptInvitationForm } from '@/features/auth/components/accept-invitation-form';

export default function WelcomeRoute() {
  const navigate = useNavigate();
  const [searchParams] = useSearchParams();
  const token = searchParams.get('token') ?? '';
  const tokenOk = tokenSchema.safeParse(token).success;
  const { data } = useMe();
  const signedInAs = data?.user;

  return (
    <AuthLayout
      title="Welcome to Phasewright"
      intro={tokenOk ? 'Tell us your name and pick a password to finish setting up your account.' : undefined}
      footer={
        <>
          Already set up?{' '}
          <Link to={paths.auth.signIn.getHref()} className="rounded font-bold text-teal hover:underline">
            Sign in
          </Link>
        </>
      }
    >
      <title>Welcome · Phasewright</title>
      {tokenOk ? (
        <div className="flex flex-col gap-5">
          {signedInAs ? (
            <Banner tone="info">
              This browser is signed in as {signedInAs.name}. Finishing the new account signs that one out here.
            </Banner>
          ) : null}
          <AcceptInvitationForm token={token} onSuccess={() => navigate(paths.home.getHref(), { replace: true })} />
        </div>
      ) : (
        <Banner tone="error" title="This invitation link is incomplete">
          Open the link from your invitation e-mail again, or ask the admin who invited you to send a new one.
        </Banner>
      )}
    </AuthLayout>
  );
}
