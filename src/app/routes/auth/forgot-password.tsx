import { Link } from 'react-router-dom';
import { AuthLayout } from '@/components/layouts/auth-layout';
import { paths } from '@/config/paths';
import { ForgotPasswordForm } from '@/features/auth/components/forgot-password-form';

export default function ForgotPasswordRoute() {
  return (
    <AuthLayout
      title="Forgot your password?"
      intro="Enter the e-mail you sign in with and we will send you a link to choose a new one."
      footer={
        <Link to={paths.auth.signIn.getHref()} className="rounded font-bold text-teal hover:underline">
          Back to sign in
        </Link>
      }
    >
      <title>Reset your password · Phasewright</title>
      <ForgotPasswordForm />
    </AuthLayout>
  );
}
