import { updateProjectSchema, type Project } from '@shared/schemas/projects';
import { FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { TextAreaField, TextField } from '@/components/ui/field';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useUpdateProject } from '@/features/projects/api/update-project';

export function ProjectDetailsForm({ project, onDone }: { project: Project; onDone: () => void }) {
  const update = useUpdateProject(project.id);
  const form = useSchemaForm(updateProjectSchema, { name: project.name, description: project.description });

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="Project details"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit(async (input) => {
        await update.mutateAsync(input);
        onDone();
      })}
    >
      <FormErrorBanner message={form.formError} />
      <TextField
        label="Project name"
        autoFocus
        maxLength={120}
        value={form.values.name ?? ''}
        onValueChange={(value) => form.setValue('name', value)}
        error={form.fieldError('name')}
      />
      <TextAreaField
        label="Description"
        maxLength={2000}
        rows={5}
        value={form.values.description ?? ''}
        onValueChange={(value) => form.setValue('description', value)}
        error={form.fieldError('description')}
      />
      <div className="flex gap-2">
        <Button type="submit" pending={update.isPending}>
          Save details
        </Button>
        <Button variant="quiet" onClick={onDone} disabled={update.isPending}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
