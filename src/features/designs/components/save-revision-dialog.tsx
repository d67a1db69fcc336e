import { useState } from 'react';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { TextAreaField } from '@/components/ui/field';

export type SaveMode = 'save' | 'save-and-run';

interface SaveRevisionDialogProps {
  mode: SaveMode | null;
  nextNumberHint: string;
  pending: boolean;
  error: string | null;
  messageError?: string;
  onSubmit: (message: string) => void;
  onClose: () => void;
}

function SaveForm({ mode, pending, error, messageError, onSubmit, onClose }: Omit<SaveRevisionDialogProps, 'nextNumberHint' | 'mode'> & { mode: SaveMode }) {
  const [message, setMessage] = useState('');
  const tooLong = message.trim().length > 500;
  return (
    <form
      noValidate
      className="flex flex-col gap-5"
      onSubmit={(event) => {
        event.preventDefault();
        if (!tooLong) onSubmit(message.trim());
      }}
    >
      {error ? <Banner>{error}</Banner> : null}
      <TextAreaField
        label="Message"
        hint="Optional. What changed and why, in a line or two."
        autoFocus
        maxLength={600}
        value={message}
        onValueChange={setMessage}
        error={tooLong ? 'Use at most 500 characters' : messageError}
      />
      <div className="flex flex-wrap justify-end gap-2">
        <Button variant="quiet" onClick={onClose} disabled={pending}>
          Cancel
        </Button>
        <Button type="submit" pending={pending}>
          {mode === 'save-and-run' ? 'Save revision and start run' : 'Save revision'}
        </Button>
      </div>
    </form>
  );
}

export function SaveRevisionDialog({ mode, nextNumberHint, pending, error, messageError, onSubmit, onClose }: SaveRevisionDialogProps) {
  return (
    <Dialog
      open={mode !== null}
      onClose={() => {
        if (!pending) onClose();
      }}
      title={mode === 'save-and-run' ? 'Save and run this design' : 'Save this design'}
      description={`${nextNumberHint} Saved revisions never change; later edits become new revisions.`}
    >
      {mode ? (
        <SaveForm mode={mode} pending={pending} error={error} messageError={messageError} onSubmit={onSubmit} onClose={onClose} />
      ) : null}
    </Dialog>
  );
}
