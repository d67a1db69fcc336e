import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { tokenSchema } from '@shared/schemas/auth';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { Banner } from '@/components/ui/banner';
import { paths } from '@/config/paths';
import { ResetPasswordForm } from '@/features/auth/components/reset-password-form';

export default function ResetPasswordRoute() {
  const navigate = useNavigate();
  const [searchParams] = useSearchParams();
  const token = searchParams.get('token') ?? '';
  const tokenOk = tokenSchema.safeParse(token).success;

  return (
    <AuthLayout
      title="Choose a new password"
      intro={tokenOk ? 'Pick a password you do not use anywhere else. You will be signed in right after.' : undefined}
      footer={
        <Link to={paths.auth.forgotPassword.getHref()} className="rounded font-bold text-teal hover:underline">
          Ask for a new reset link
        </Link>
      }
    >
      <title>Choose a new password · Phasewright</title>
      {tokenOk ? (
        <ResetPasswordForm token={token} onSuccess={() => navigate(paths.home.getHref(), { replace: true })} />
      ) : (
        <Banner tone="error" title="This link is incomplete">
          Open the link from the e-mail again — copying it by hand often cuts it short — or ask for a new one.
        </Banner>
      )}
    </AuthLayout>
  );
}
