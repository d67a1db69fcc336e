import { useState } from 'react';
import type { Project } from '@shared/schemas/projects';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { useArchiveProject } from '@/features/projects/api/archive-project';
import { useUnarchiveProject } from '@/features/projects/api/unarchive-project';

export function ProjectArchiveCard({ project }: { project: Project }) {
  const archive = useArchiveProject(project.id);
  const unarchive = useUnarchiveProject(project.id);
  const [confirming, setConfirming] = useState(false);

  if (project.archived) {
    return (
      <Card
        title="Archived"
        description="This project is out of the active list. Its members still see everything in it."
        headingLevel="h3"
      >
        {unarchive.error ? <p className="mb-3 text-sm font-semibold text-danger">{unarchive.error.message}</p> : null}
        <Button variant="secondary" pending={unarchive.isPending} onClick={() => unarchive.mutate()}>
          Bring back to active
        </Button>
      </Card>
    );
  }

  return (
    <Card
      title="Archive"
      description="Finished or paused? Archiving moves the project out of the active list. Nothing is deleted, and you can bring it back at any time."
      headingLevel="h3"
    >
      <Button variant="danger" onClick={() => setConfirming(true)}>
        Archive project
      </Button>
      <ConfirmDialog
        open={confirming}
        title={`Archive “${project.name}”?`}
        confirmLabel="Archive"
        pending={archive.isPending}
        error={archive.error?.message}
        onClose={() => {
          archive.reset();
          setConfirming(false);
        }}
        onConfirm={() => archive.mutate(undefined, { onSuccess: () => setConfirming(false) })}
      >
        Members keep access and every record stays as it is. The project moves to the Archived list.
      </ConfirmDialog>
    </Card>
  );
}
