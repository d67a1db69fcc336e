import { SITE_ROLES, type SiteRole } from '@shared/roles';
import { createUserSchema } from '@shared/schemas/admin';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useInviteUser } from '@/features/admin/api/invite-user';
import { siteRoleName } from '@/features/admin/components/site-role';

const roleOptions = SITE_ROLES.map((role) => ({ value: role, label: siteRoleName(role) }));
const empty = { email: '', name: '', siteRole: 'member' as SiteRole };

export function InviteUserForm() {
  const invite = useInviteUser();
  const form = useSchemaForm(createUserSchema, empty);

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Invite a person"
      className="flex flex-col gap-4"
      onSubmit={form.handleSubmit(async (input) => {
        await invite.mutateAsync(input);
        form.reset(empty);
      }, invite.reset)}
    >
      <FormErrorBanner message={form.formError} />
      {invite.isSuccess ? (
        <Banner tone="success">
          Invitation sent to {invite.data.user.email}. The link in it lets {invite.data.user.name} choose a password.
        </Banner>
      ) : null}
      <div className="grid gap-4 md:grid-cols-[minmax(0,1fr)_minmax(0,1fr)_11rem]">
        <TextField
          label="Name"
          autoComplete="off"
          value={form.values.name}
          onValueChange={(value) => {
            invite.reset();
            form.setValue('name', value);
          }}
          error={form.fieldError('name')}
        />
        <TextField
          label="E-mail"
          type="email"
          autoComplete="off"
          value={form.values.email}
          onValueChange={(value) => {
            invite.reset();
            form.setValue('email', value);
          }}
          error={form.fieldError('email')}
        />
        <SelectField
          label="Site role"
          options={roleOptions}
          value={form.values.siteRole ?? 'member'}
          onValueChange={(value) => form.setValue('siteRole', value)}
          error={form.fieldError('siteRole')}
        />
      </div>
      <div>
        <Button type="submit" pending={invite.isPending}>
          Send invitation
        </Button>
      </div>
    </form>
  );
}
