import { useEffect, useId, useRef, type ReactNode } from 'react';

interface DialogProps {
  open: boolean;
  onClose: () => void;
  title: string;
  description?: ReactNode;
  children: ReactNode;
  width?: 'sm' | 'md';
}

/** A modal built on the native `<dialog>`: focus is kept inside, Escape closes it, focus returns on close. */
export function Dialog({ open, onClose, title, description, children, width = 'md' }: DialogProps) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  const descriptionId = useId();

  useEffect(() => {
    const dialog = ref.current;
    if (!dialog) return;
    if (open && !dialog.open) dialog.showModal();
    if (!open && dialog.open) dialog.close();
  }, [open]);

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      aria-describedby={description ? descriptionId : undefined}
      onCancel={(event) => {
        event.preventDefault();
        onClose();
      }}
      onClick={(event) => {
        if (event.target === event.currentTarget) onClose();
      }}
      className={`m-auto w-[calc(100%-2rem)] rounded-card bg-card p-0 text-ink shadow-2xl ring-1 ring-line ${width === 'sm' ? 'max-w-md' : 'max-w-lg'}`}
    >
      {open ? (
        <div className="p-6">
          <h2 id={titleId} className="text-xl font-extrabold">
            {title}
          </h2>
          {description ? (
            <div id={descriptionId} className="mt-1 text-sm text-ink-soft">
              {description}
            </div>
          ) : null}
          <div className="mt-5">{children}</div>
        </div>
      ) : null}
    </dialog>
  );
}
