import { changePasswordSchema } from '@shared/schemas/auth';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useChangePassword } from '@/features/auth/api/change-password';
import { withConfirmation } from '@/features/auth/components/password-pair';

const changePasswordFormSchema = withConfirmation(changePasswordSchema, 'newPassword');
const empty = { currentPassword: '', newPassword: '', confirmPassword: '' };

export function ChangePasswordForm() {
  const change = useChangePassword();
  const form = useSchemaForm(changePasswordFormSchema, empty);

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Change password"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit(async ({ currentPassword, newPassword }) => {
        await change.mutateAsync({ currentPassword, newPassword });
        form.reset(empty);
      }, change.reset)}
    >
      <FormErrorBanner message={form.formError} />
      {change.isSuccess ? <Banner tone="success">Your password is changed. Use the new one next time you sign in.</Banner> : null}
      <TextField
        label="Current password"
        type="password"
        autoComplete="current-password"
        value={form.values.currentPassword}
        onValueChange={(value) => form.setValue('currentPassword', value)}
        error={form.fieldError('currentPassword')}
      />
      <TextField
        label="New password"
        type="password"
        autoComplete="new-password"
        hint="At least 10 characters."
        value={form.values.newPassword}
        onValueChange={(value) => {
          change.reset();
          form.setValue('newPassword', value);
        }}
        error={form.fieldError('newPassword')}
      />
      <TextField
        label="New password, again"
        type="password"
        autoComplete="new-password"
        value={form.values.confirmPassword}
        onValueChange={(value) => form.setValue('confirmPassword', value)}
        error={form.fieldError('confirmPassword')}
      />
      <div>
        <Button type="submit" pending={change.isPending}>
          Change password
        </Button>
      </div>
    </form>
  );
}
