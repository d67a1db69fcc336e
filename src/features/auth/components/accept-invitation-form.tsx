import { acceptInvitationSchema } from '@shared/schemas/auth';
import { FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useAcceptInvitation } from '@/features/auth/api/accept-invitation';
import { NewPasswordFields } from '@/features/auth/components/new-password-fields';
import { withConfirmation } from '@/features/auth/components/password-pair';

const invitationFormSchema = withConfirmation(acceptInvitationSchema, 'password');

export function AcceptInvitationForm({ token, onSuccess }: { token: string; onSuccess: () => void }) {
  const accept = useAcceptInvitation();
  const form = useSchemaForm(invitationFormSchema, { token, name: '', password: '', confirmPassword: '' });

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Set up your account"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit(async ({ name, password }) => {
        await accept.mutateAsync({ token, name, password });
        onSuccess();
      })}
    >
      <FormErrorBanner message={form.formError} />
      <TextField
        label="Your name"
        autoComplete="name"
        autoFocus
        hint="Shown to your teammates on projects and reviews."
        value={form.values.name}
        onValueChange={(value) => form.setValue('name', value)}
        error={form.fieldError('name')}
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
      <Button type="submit" pending={accept.isPending} className="w-full">
        Create my account
      </Button>
    </form>
  );
}
