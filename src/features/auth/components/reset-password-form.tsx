import { resetPasswordSchema } from '@shared/schemas/auth';
import { FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useCompletePasswordReset } from '@/features/auth/api/complete-password-reset';
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
      <TextField
        label="New password"
        type="password"
        autoComplete="new-password"
        autoFocus
        hint="At least 10 characters. A few unrelated words make a strong one."
        value={form.values.password}
        onValueChange={(value) => form.setValue('password', value)}
        error={form.fieldError('password')}
      />
      <TextField
        label="New password, again"
        type="password"
        autoComplete="new-password"
        value={form.values.confirmPassword}
        onValueChange={(value) => form.setValue('confirmPassword', value)}
        error={form.fieldError('confirmPassword')}
      />
      <Button type="submit" pending={complete.isPending} className="w-full">
        Save password and sign in
      </Button>
    </form>
  );
}
