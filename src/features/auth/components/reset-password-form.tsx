import { resetPasswordSchema } from '@shared/schemas/auth';
import { FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useCompletePasswordReset } from '@/features/auth/api/complete-password-reset';
import { NewPasswordFields } from '@/features/auth/components/new-password-fields';
import { withConfirmation } from '@/features/auth/components/password-pair';

const resetFormSchema = withConfirmation(resetPasswordSchema, 'password');

export function ResetPasswordForm({ token, onSuccess }: { token: string; onSuccess: () => void }) {
  const complete = useCompletePasswordReset();
  const form = useSchemaForm(resetFormSchema, { token, password: '', confirmPassword: '' });

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Choose a new password"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit(async ({ password }) => {
        await complete.mutateAsync({ token, password });
        onSuccess();
      })}
    >
      <FormErrorBanner message={form.formError} />
      <NewPasswordFields
        label="New password"
        hint="At least 10 characters. A few unrelated words make a strong one."
        autoFocus
        password={form.values.password}
        confirmation={form.values.confirmPassword}
        onPasswordChange={(value) => form.setValue('password', value)}
        onConfirmationChange={(value) => form.setValue('confirmPassword', value)}
        passwordError={form.fieldError('password')}
        confirmationError={form.fieldError('confirmPassword')}
      />
      <Button type="submit" pending={complete.isPending} className="w-full">
        Save password and sign in
      </Button>
    </form>
  );
}
