import { useId, useRef, useState } from 'react';
import type { AssetRef } from '@shared/schemas/design';
import { UPLOAD_LIMITS, type Upload, type UploadKind } from '@shared/schemas/uploads';
import { useMe } from '@/features/auth/api/get-me';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { PlusIcon } from '@/components/ui/icons';
import { Spinner } from '@/components/ui/spinner';
import { isApiError } from '@/lib/api-client';
import { useCreateUpload } from '@/features/designs/api/create-upload';
import { useDeleteUpload } from '@/features/designs/api/delete-upload';
import { uploadContentUrl, useUploads } from '@/features/designs/api/get-uploads';
import { DEMO_IMAGES } from '@/features/designs/utils/demo-images';
import { formatDateTime } from '@/lib/format';

interface Choice {
  key: string;
  ref: AssetRef;
  label: string;
  detail: string;
  thumbnail: string | null;
  /** Set for the project's own uploads, which a designer may delete. */
  upload?: Upload;
}

function sameRef(a: AssetRef | undefined, b: AssetRef) {
  if (!a || a.source !== b.source) return false;
  if (a.source === 'demo' && b.source === 'demo') return a.name === b.name;
  if (a.source === 'upload' && b.source === 'upload') return a.id === b.id;
  if (a.source === 'file' && b.source === 'file') return a.path === b.path;
  return false;
}

const ACCEPT: Record<UploadKind, string> = {
  image: 'image/png,image/jpeg,.png,.jpg,.jpeg',
  'phase-map': '.npy,image/png,.png',
};

/** SHA-256 of a file, hex, or null where the browser offers no digest (not a secure context). */
async function fileHash(file: File): Promise<string | null> {
  if (!globalThis.crypto?.subtle) return null;
  const digest = await crypto.subtle.digest('SHA-256', await file.arrayBuffer());
  return Array.from(new Uint8Array(digest), (b) => b.toString(16).padStart(2, '0')).join('');
}

function uploadChoice(projectId: number, upload: Upload): Choice {
  return {
    key: `upload-${upload.id}`,
    ref: { source: 'upload', id: upload.id },
    label: upload.name,
    detail: `${upload.width} × ${upload.height} · ${formatDateTime(upload.createdAt)}`,
    thumbnail: upload.mime === 'application/x-npy' ? null : uploadContentUrl(projectId, upload.id),
    upload,
  };
}

interface AssetPickerProps {
  projectId: number;
  kind: UploadKind;
  legend: string;
  value: AssetRef | undefined;
  onChange: (ref: AssetRef, size: { width: number; height: number } | null) => void;
  canUpload: boolean;
  error?: string;
  dataField: string;
}

/** Chooses a target picture or phase map: our demo targets, the project's uploads, or a new upload. */
export function AssetPicker({ projectId, kind, legend, value, onChange, canUpload, error, dataField }: AssetPickerProps) {
  const uploads = useUploads(projectId);
  const create = useCreateUpload(projectId);
  const remove = useDeleteUpload(projectId);
  const [deleting, setDeleting] = useState<Upload | null>(null);
  const inputRef = useRef<HTMLInputElement>(null);
  const [uploadError, setUploadError] = useState<string | null>(null);
  // The server's own limits; the defaults until they have loaded.
  const limits = useMe().data?.limits ?? { uploadMaxBytes: UPLOAD_LIMITS.maxBytes, uploadMaxSide: UPLOAD_LIMITS.maxSide };
  const [uploadNote, setUploadNote] = useState<string | null>(null);
  const name = useId();

  const ownUploads = (uploads.data ?? []).filter((upload) => upload.kind === kind);
  const choices: Choice[] = [
    ...(kind === 'image'
      ? DEMO_IMAGES.map((image) => ({
          key: `demo-${image.name}`,
          ref: { source: 'demo', name: image.name } as AssetRef,
          label: image.label,
          detail: 'demo target',
          thumbnail: image.url,
        }))
      : []),
    ...ownUploads.map((upload) => uploadChoice(projectId, upload)),
  ];
  const selectedIsListed = value ? choices.some((choice) => sameRef(value, choice.ref)) : false;

  const sizeOf = (ref: AssetRef) => {
    if (ref.source === 'demo') return DEMO_IMAGES.find((image) => image.name === ref.name) ?? null;
    if (ref.source === 'upload') return ownUploads.find((upload) => upload.id === ref.id) ?? null;
    return null;
  };

  async function upload(file: File) {
    setUploadError(null);
    if (file.size > limits.uploadMaxBytes) {
      setUploadError(`The file is ${(file.size / 1048576).toFixed(1)} MB; this server's limit is ${+(limits.uploadMaxBytes / 1048576).toFixed(3)} MB.`);
      return;
    }
    try {
      // The same file again: choose the upload the project already has instead of storing a second copy.
      const hash = await fileHash(file);
      const same = ownUploads.find((u) => (hash ? u.sha256 === hash : u.size === file.size && u.name === file.name));
      if (same) {
        setUploadNote(`“${file.name}” is already uploaded (${formatDateTime(same.createdAt)}) — that upload is chosen.`);
        onChange({ source: 'upload', id: same.id }, { width: same.width, height: same.height });
        return;
      }
      setUploadNote(null);
      const { upload: created } = await create.mutateAsync({ file, kind });
      onChange({ source: 'upload', id: created.id }, { width: created.width, height: created.height });
    } catch (caught) {
      if (isApiError(caught)) {
        const extra = Object.values(caught.details).filter((text) => !caught.message.toLowerCase().includes(text.toLowerCase()));
        setUploadError([caught.message, ...extra].join(' — '));
      } else {
        setUploadError('The upload did not go through — try again.');
      }
    } finally {
      if (inputRef.current) inputRef.current.value = '';
    }
  }

  return (
    <fieldset data-field={dataField} className="flex flex-col gap-2">
      <legend className="mb-1.5 text-sm font-bold">{legend}</legend>
      <div className="flex flex-wrap gap-2" role="radiogroup" aria-label={legend} aria-invalid={error ? true : undefined}>
        {choices.map((choice) => {
          const selected = sameRef(value, choice.ref);
          return (
            <div key={choice.key} className="flex w-28 flex-col items-stretch gap-1">
              <label
                className={`flex w-full cursor-pointer flex-col gap-1 rounded-xl p-1.5 text-xs ring-1 ring-inset transition-colors has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-teal has-[:disabled]:cursor-default ${
                  selected ? 'bg-ember-wash ring-2 ring-ember' : 'bg-card ring-line hover:bg-paper'
                }`}
              >
                <input
                  type="radio"
                  name={name}
                  className="sr-only"
                  checked={selected}
                  onChange={() => onChange(choice.ref, sizeOf(choice.ref))}
                />
                {choice.thumbnail ? (
                  <img src={choice.thumbnail} alt="" className="aspect-square w-full rounded-lg bg-ink-deep object-contain" loading="lazy" />
                ) : (
                  <span className="flex aspect-square w-full items-center justify-center rounded-lg bg-paper-deep font-bold text-ink-soft">.npy</span>
                )}
                <span className="truncate font-bold" title={choice.label}>
                  {choice.label}
                </span>
                <span className="text-ink-soft">{choice.detail}</span>
              </label>
              {choice.upload && canUpload ? (
                <Button variant="quiet" size="sm" className="text-danger" onClick={() => setDeleting(choice.upload ?? null)} aria-label={`Delete ${choice.label}`}>
                  Delete
                </Button>
              ) : null}
            </div>
          );
        })}
        {value && !selectedIsListed && !uploads.isPending ? (
          <p className="self-center text-sm text-ink-soft">
            {value.source === 'upload' ? `Upload #${value.id} (no longer listed)` : value.source === 'file' ? `File ${value.path}` : value.name}
          </p>
        ) : null}
        {uploads.isPending ? <Spinner className="size-5 self-center text-ember" /> : null}
      </div>
      {uploads.isError ? <p className="text-sm text-danger">The project's uploads did not load: {uploads.error.message}</p> : null}
      {error ? (
        <p className="flex items-start gap-1 text-sm font-semibold text-danger">
          <span aria-hidden="true">▲</span>
          {error}
        </p>
      ) : null}
      {canUpload ? (
        <div className="flex flex-wrap items-center gap-2">
          <input
            ref={inputRef}
            type="file"
            accept={ACCEPT[kind]}
            className="sr-only"
            tabIndex={-1}
            aria-hidden="true"
            onChange={(event) => {
              const file = event.target.files?.[0];
              if (file) void upload(file);
            }}
          />
          <Button
            variant="secondary"
            size="sm"
            icon={<PlusIcon className="size-4" />}
            pending={create.isPending}
            onClick={() => inputRef.current?.click()}
          >
            {kind === 'image' ? 'Upload a PNG or JPEG' : 'Upload a phase map'}
          </Button>
          <span className="text-xs text-ink-soft">
            {kind === 'image'
              ? `Grayscale or colour (read as gray), up to ${limits.uploadMaxSide} px a side.`
              : 'N × N float .npy in radians, or a grayscale PNG (0…255 → 0…2π).'}
          </span>
        </div>
      ) : null}
      {uploadNote ? (
        <p className="text-sm text-ink-soft" role="status">
          {uploadNote}
        </p>
      ) : null}
      {uploadError ? <Banner title="Upload refused">{uploadError}</Banner> : null}
      <ConfirmDialog
        open={deleting !== null}
        title={`Delete “${deleting?.name ?? ''}”?`}
        confirmLabel="Delete upload"
        pending={remove.isPending}
        error={remove.error?.message ?? null}
        onClose={() => {
          remove.reset();
          setDeleting(null);
        }}
        onConfirm={() => {
          if (deleting) remove.mutate(deleting.id, { onSuccess: () => setDeleting(null) });
        }}
      >
        The file is removed from the project and its storage is freed. Revisions that use it keep their settings
        but can no longer be run until you choose another file.
      </ConfirmDialog>
    </fieldset>
  );
}
