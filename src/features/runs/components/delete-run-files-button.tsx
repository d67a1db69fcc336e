import { useState } from 'react';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { useDeleteRunFiles } from '@/features/runs/api/delete-run-files';
import { formatBytes } from '@/features/runs/components/artifact-groups';

interface DeleteRunFilesButtonProps {
  projectId: number;
  runId: number;
  totalBytes: number;
}

/** Frees the project's storage: deletes the run's files after a confirmation; the run and its metrics stay. */
export function DeleteRunFilesButton({ projectId, runId, totalBytes }: DeleteRunFilesButtonProps) {
  const remove = useDeleteRunFiles(projectId, runId);
  const [confirming, setConfirming] = useState(false);
  return (
    <>
      <Button variant="danger" size="sm" onClick={() => setConfirming(true)}>
        Delete files
      </Button>
      <ConfirmDialog
        open={confirming}
        title={`Delete the files of run ${runId}?`}
        confirmLabel="Delete files"
        pending={remove.isPending}
        error={remove.error?.message ?? null}
        onClose={() => {
          remove.reset();
          setConfirming(false);
        }}
        onConfirm={() => remove.mutate(undefined, { onSuccess: () => setConfirming(false) })}
      >
        Frees {formatBytes(totalBytes)} of the project’s storage. The previews, maps, layout, GDSII and every download of
        this run go for good; its status, metrics, history and review threads stay. Running the revision again makes new
        files.
      </ConfirmDialog>
    </>
  );
}
