import { PROJECT_ROLES, type ProjectRole } from '@shared/roles';
import { addMemberSchema } from '@shared/schemas/projects';
import { Banner, FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useAddMember } from '@/features/projects/api/add-member';
import { projectRoleDuties, projectRoleName } from '@/features/projects/components/project-role-badge';

const roleOptions = PROJECT_ROLES.map((role) => ({ value: role, label: projectRoleName(role) }));
const empty = { email: '', role: 'designer' as ProjectRole };

/** `mayInvite`: the person adding may bring in someone without an account (a site admin, or while sign-up is open). */
export function AddMemberForm({ projectId, mayInvite }: { projectId: number; mayInvite: boolean }) {
  const add = useAddMember(projectId);
  const form = useSchemaForm(addMemberSchema, empty);

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Add a member"
      className="flex flex-col gap-4"
      onSubmit={form.handleSubmit(async (input) => {
        await add.mutateAsync(input);
        form.reset(empty);
      }, add.reset)}
    >
      <FormErrorBanner message={form.formError} />
      {add.isSuccess ? (
        <Banner tone="success">
          {add.data.invited
            ? `${add.data.member.email} has no account yet: an invitation is on its way. Once they choose a password they join as ${projectRoleName(add.data.member.role).toLowerCase()}.`
            : `${add.data.member.name} is now a ${projectRoleName(add.data.member.role).toLowerCase()} on this project.`}
        </Banner>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-[minmax(0,1fr)_12rem]">
        <TextField
          label="Member's e-mail"
          type="email"
          autoComplete="off"
          hint={
            mayInvite
              ? 'Someone without a Phasewright account gets an e-mail invitation to join with this role.'
              : 'Only people who already have a Phasewright account can be added; a site admin invites anyone new.'
          }
          value={form.values.email}
          onValueChange={(value) => {
            add.reset();
            form.setValue('email', value);
          }}
          error={form.fieldError('email')}
        />
        <SelectField
          label="Role on this project"
          options={roleOptions}
          value={form.values.role}
          onValueChange={(value) => form.setValue('role', value)}
          hint={projectRoleDuties(form.values.role)}
          error={form.fieldError('role')}
        />
      </div>
      <div>
        <Button type="submit" pending={add.isPending}>
          Add member
        </Button>
      </div>
    </form>
  );
}
