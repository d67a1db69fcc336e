import { changePasswordSchema } from '@shared/schemas/auth';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useChangePassword } from '@/features/auth/api/change-password';
import { NewPasswordFields } from '@/features/auth/components/new-password-fields';
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
      {change.isSuccess ? (
        <Banner tone="success">
          Your password is changed. Every other browser signed in to your account is signed out
          {change.data.revokedTokens > 0
            ? `, and your ${change.data.revokedTokens} access token${change.data.revokedTokens === 1 ? ' was' : 's were'} revoked — create new ones for your scripts`
            : ''}
          .
        </Banner>
      ) : null}
      <TextField
        label="Current password"
        type="password"
        autoComplete="current-password"
        value={form.values.currentPassword}
        onValueChange={(value) => form.setValue('currentPassword', value)}
        error={form.fieldError('currentPassword')}
      />
      <NewPasswordFields
        label="New password"
        password={form.values.newPassword}
        confirmation={form.values.confirmPassword}
        onPasswordChange={(value) => {
          change.reset();
          form.setValue('newPassword', value);
        }}
        onConfirmationChange={(value) => form.setValue('confirmPassword', value)}
        passwordError={form.fieldError('newPassword')}
        confirmationError={form.fieldError('confirmPassword')}
      />
      <div>
        <Button type="submit" pending={change.isPending}>
          Change password
        </Button>
      </div>
    </form>
  );
}
