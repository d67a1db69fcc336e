import { useState } from 'react';
import { createProjectSchema, type Project } from '@shared/schemas/projects';
import { FormErrorBanner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { TextAreaField, TextField } from '@/components/ui/field';
import { PlusIcon } from '@/components/ui/icons';
import { useSchemaForm } from '@/hooks/use-schema-form';
import { useCreateProject } from '@/features/projects/api/create-project';

function CreateProjectForm({ onCreated, onCancel }: { onCreated: (project: Project) => void; onCancel: () => void }) {
  const create = useCreateProject();
  const form = useSchemaForm(createProjectSchema, { name: '', description: '' });

  return (
    <form
      ref={form.formRef}
      noValidate
      aria-label="New project"
      className="flex flex-col gap-5"
      onSubmit={form.handleSubmit(async (input) => {
        const { project } = await create.mutateAsync(input);
        onCreated(project);
      })}
    >
      <FormErrorBanner message={form.formError} />
      <TextField
        label="Project name"
        autoFocus
        maxLength={120}
        placeholder="e.g. Twin-image security tag, 633 nm"
        value={form.values.name}
        onValueChange={(value) => form.setValue('name', value)}
        error={form.fieldError('name')}
      />
      <TextAreaField
        label="Description"
        hint="Optional. What the device should do, for whom, and any deadline worth knowing."
        maxLength={2000}
        value={form.values.description ?? ''}
        onValueChange={(value) => form.setValue('description', value)}
        error={form.fieldError('description')}
      />
      <div className="flex justify-end gap-2">
        <Button variant="quiet" onClick={onCancel} disabled={create.isPending}>
          Cancel
        </Button>
        <Button type="submit" pending={create.isPending}>
          Create project
        </Button>
      </div>
    </form>
  );
}

export function CreateProjectButton({ onCreated, label = 'New project' }: { onCreated: (project: Project) => void; label?: string }) {
  const [open, setOpen] = useState(false);
  return (
    <>
      <Button icon={<PlusIcon className="size-4" />} onClick={() => setOpen(true)}>
        {label}
      </Button>
      <Dialog
        open={open}
        onClose={() => setOpen(false)}
        title="New project"
        description="A project holds the designs, runs and reviews for one device. You become its owner and can invite others."
      >
        <CreateProjectForm
          onCancel={() => setOpen(false)}
          onCreated={(project) => {
            setOpen(false);
            onCreated(project);
          }}
        />
      </Dialog>
    </>
  );
}
