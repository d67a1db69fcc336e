import { resetRequestSchema } from '@shared/schemas/auth';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useRequestPasswordReset } from '@/features/auth/api/request-password-reset';

export function ForgotPasswordForm() {
  const request = useRequestPasswordReset();
  const form = useSchemaForm(resetRequestSchema, { email: '' });

  if (request.isSuccess) {
    return (
      <Banner tone="success" title="Check your inbox">
        {request.data.message}. The link works for a limited time; if nothing arrives, check the address and ask
        again.
      </Banner>
    );
  }

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Request a reset link"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit((input) => request.mutateAsync(input))}
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
      <Button type="submit" pending={request.isPending} className="w-full">
        Send me a reset link
      </Button>
    </form>
  );
}
