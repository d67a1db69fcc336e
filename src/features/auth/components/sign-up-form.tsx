import { signUpSchema } from '@shared/schemas/auth';
import { FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useSignUp } from '@/features/auth/api/sign-up';
import { NewPasswordFields } from '@/features/auth/components/new-password-fields';
import { withConfirmation } from '@/features/auth/components/password-pair';

const signUpFormSchema = withConfirmation(signUpSchema, 'password');

export function SignUpForm({ onSuccess }: { onSuccess: () => void }) {
  const signUp = useSignUp();
  const form = useSchemaForm(signUpFormSchema, { email: '', name: '', password: '', confirmPassword: '' });

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Create an account"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit(async ({ email, name, password }) => {
        await signUp.mutateAsync({ email, name, password });
        onSuccess();
      })}
    >
      <FormErrorBanner message={form.formError} />
      <TextField
        label="Your name"
        autoComplete="name"
        autoFocus
        value={form.values.name}
        onValueChange={(value) => form.setValue('name', value)}
        error={form.fieldError('name')}
      />
      <TextField
        label="E-mail"
        type="email"
        autoComplete="email"
        value={form.values.email}
        onValueChange={(value) => form.setValue('email', value)}
        error={form.fieldError('email')}
      />
      <NewPasswordFields
        label="Password"
        password={form.values.password}
        confirmation={form.values.confirmPassword}
        onPasswordChange={(value) => form.setValue('password', value)}
        onConfirmationChange={(value) => form.setValue('confirmPassword', value)}
        passwordError={form.fieldError('password')}
        confirmationError={form.fieldError('confirmPassword')}
      />
      <Button type="submit" pending={signUp.isPending} className="w-full">
        Create account
      </Button>
    </form>
  );
}
