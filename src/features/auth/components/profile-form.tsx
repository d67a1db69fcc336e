import type { User } from '@shared/schemas/auth';
import { updateProfileSchema } from '@shared/schemas/auth';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useUpdateProfile } from '@/features/auth/api/update-profile';

export function ProfileForm({ user }: { user: User }) {
  const update = useUpdateProfile();
  const form = useSchemaForm(updateProfileSchema, { name: user.name });
  const unchanged = form.values.name.trim() === user.name;

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Profile"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit((input) => update.mutateAsync(input), update.reset)}
    >
      <FormErrorBanner message={form.formError} />
      {update.isSuccess && unchanged ? <Banner tone="success">Your name is saved.</Banner> : null}
      <TextField
        label="Name"
        autoComplete="name"
        hint="Teammates see this on projects and member lists."
        value={form.values.name}
        onValueChange={(value) => {
          update.reset();
          form.setValue('name', value);
        }}
        error={form.fieldError('name')}
      />
      <div className="flex flex-col gap-1.5">
        <span className="text-sm font-bold">E-mail</span>
        <span className="text-ink-soft">{user.email}</span>
        <span className="text-xs text-ink-soft">To use a different address, ask a site admin.</span>
      </div>
      <div>
        <Button type="submit" pending={update.isPending} disabled={unchanged}>
          Save name
        </Button>
      </div>
    </form>
  );
}
