import { signUpSchema } from '@shared/schemas/auth';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useSignUp } from '@/features/auth/api/sign-up';

/** Name and e-mail; the password is chosen through the link the server mails to the address. */
export function SignUpForm() {
  const signUp = useSignUp();
  const form = useSchemaForm(signUpSchema, { email: '', name: '' });

  if (signUp.data) {
    return (
      <Banner tone="info" title="Check your e-mail">
        {signUp.data.message}. Open it to choose your password. Nothing arrived? Check the address and your spam folder, or
        ask a site admin.
      </Banner>
    );
  }
  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Create an account"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit(async ({ email, name }) => {
        await signUp.mutateAsync({ email, name });
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
      <p className="text-sm text-ink-soft">We e-mail you a link to choose your password; it works for seven days.</p>
      <Button type="submit" pending={signUp.isPending} className="w-full">
        Send the link
      </Button>
    </form>
  );
}
