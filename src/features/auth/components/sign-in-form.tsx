import { Link } from 'react-router-dom';
import { signInSchema } from '@shared/schemas/auth';
import { FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { paths } from '@/config/paths';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useSignIn } from '@/features/auth/api/sign-in';

export function SignInForm({ onSuccess }: { onSuccess: () => void }) {
  const signIn = useSignIn();
  const form = useSchemaForm(signInSchema, { email: '', password: '' });

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Sign in"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit(async (input) => {
        await signIn.mutateAsync(input);
        onSuccess();
      })}
    >
      <FormErrorBanner message={form.formError} />
      <TextField
        label="E-mail"
        type="email"
        autoComplete="email"
        autoFocus
        value={form.values.email}
        onValueChange={(value) => form.setValue('email', value)}
        error={form.fieldError('email')}
      />
      <div className="flex flex-col gap-1.5">
        <TextField
          label="Password"
          type="password"
          autoComplete="current-password"
          value={form.values.password}
          onValueChange={(value) => form.setValue('password', value)}
          error={form.fieldError('password')}
        />
        <Link to={paths.auth.forgotPassword.getHref()} className="self-end rounded text-sm font-bold text-teal hover:underline">
          Forgot your password?
        </Link>
      </div>
      <Button type="submit" pending={signIn.isPending} className="mt-1 w-full">
        Sign in
      </Button>
    </form>
  );
}
