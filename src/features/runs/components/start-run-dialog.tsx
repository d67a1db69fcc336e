import { useState, type FormEvent } from 'react';
import type { RunDetail } from '@shared/schemas/runs';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { TextField } from '@/components/ui/field';
import { PlusIcon } from '@/components/ui/icons';
import { isApiError } from '@/lib/api-client';
import { useStartRun } from '@/features/runs/api/start-run';

interface StartRunButtonProps {
  projectId: number;
  suggestedRevision: number | null;
  onStarted: (run: RunDetail) => void;
  label?: string;
}

/** Owners and designers: queue a run of a saved revision, chosen by its number. */
export function StartRunButton({ projectId, suggestedRevision, onStarted, label = 'Start a run' }: StartRunButtonProps) {
  const [open, setOpen] = useState(false);
  const [revision, setRevision] = useState('');
  const [fieldError, setFieldError] = useState<string | undefined>();
  const start = useStartRun(projectId);

  const openDialog = () => {
    setRevision(suggestedRevision ? String(suggestedRevision) : '');
    setFieldError(undefined);
    start.reset();
    setOpen(true);
  };

  const submit = (event: FormEvent) => {
    event.preventDefault();
    const text = revision.trim();
    if (!/^[1-9][0-9]{0,8}$/.test(text)) {
      setFieldError('Enter the number of a saved revision: 1, 2, 3…');
      return;
    }
    setFieldError(undefined);
    start.mutate(
      { revisionNumber: Number(text) },
      {
        onSuccess: (data) => {
          setOpen(false);
          onStarted(data.run);
        },
      },
    );
  };

  const serverError = start.error
    ? isApiError(start.error, 404)
      ? `This project has no revision ${revision.trim()}. Save the design as a revision first, then run it.`
      : start.error.message
    : null;

  return (
    <>
      <Button icon={<PlusIcon className="size-4" />} onClick={openDialog}>
        {label}
      </Button>
      <Dialog
        open={open}
        onClose={() => setOpen(false)}
        title="Start a run"
        description="The server retrieves both channels' phases, maps every cell to a meta-atom, simulates the realized device and stores the previews, metrics and fab files. It runs in the background; you can leave the page."
        width="sm"
      >
        <form onSubmit={submit} noValidate className="flex flex-col gap-4">
          {serverError ? <Banner>{serverError}</Banner> : null}
          <TextField
            label="Revision number"
            value={revision}
            onValueChange={setRevision}
            inputMode="numeric"
            autoComplete="off"
            autoFocus
            error={fieldError}
            hint="Each saved version of the design has a number; the Revisions tab lists them."
          />
          <div className="flex flex-wrap justify-end gap-2">
            <Button variant="quiet" onClick={() => setOpen(false)} disabled={start.isPending}>
              Not now
            </Button>
            <Button type="submit" pending={start.isPending}>
              Run revision
            </Button>
          </div>
        </form>
      </Dialog>
    </>
  );
}
