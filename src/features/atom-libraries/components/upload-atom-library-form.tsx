import { useId, useRef, useState, type FormEvent } from 'react';
import type { AtomLibraryDetail, AtomLibraryScope } from '@shared/schemas/atom-libraries';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { SelectField, TextField } from '@/components/ui/field';
import { isApiError } from '@/lib/api-client';
import { useCreateAtomLibrary } from '@/features/atom-libraries/api/create-atom-library';

const SCOPE_OPTIONS: { value: AtomLibraryScope; label: string }[] = [
  { value: 'project', label: 'This project only' },
  { value: 'personal', label: 'Only me, until I share it with a project' },
];

interface UploadAtomLibraryFormProps {
  projectId: number;
  onUploaded: (library: AtomLibraryDetail, warnings: string[]) => void;
}

/** Upload of a library CSV; the server's row-and-column problems are listed when it refuses the file. */
export function UploadAtomLibraryForm({ projectId, onUploaded }: UploadAtomLibraryFormProps) {
  const fileId = useId();
  const fileInput = useRef<HTMLInputElement>(null);
  const [file, setFile] = useState<File | null>(null);
  const [name, setName] = useState('');
  const [scope, setScope] = useState<AtomLibraryScope>('project');
  const [material, setMaterial] = useState('');
  const [wavelengthNm, setWavelengthNm] = useState('');
  const [periodNm, setPeriodNm] = useState('');
  const [heightNm, setHeightNm] = useState('');
  const [missingFile, setMissingFile] = useState(false);
  const create = useCreateAtomLibrary(projectId);

  const submit = async (event: FormEvent) => {
    event.preventDefault();
    if (!file) {
      setMissingFile(true);
      return;
    }
    try {
      const result = await create.mutateAsync({ file, name, scope, material, wavelengthNm, periodNm, heightNm });
      setFile(null);
      setName('');
      if (fileInput.current) fileInput.current.value = '';
      onUploaded(result.atomLibrary, result.warnings);
    } catch {
      // Shown below from the mutation's error.
    }
  };

  const error = create.error;
  const problems = isApiError(error) ? Object.entries(error.details) : [];

  return (
    <form aria-label="Upload a library" onSubmit={(event) => void submit(event)} noValidate className="flex flex-col gap-4">
      <div className="flex flex-col gap-1.5">
        <label htmlFor={fileId} className="text-sm font-bold text-ink">
          Library CSV file
        </label>
        <input
          id={fileId}
          ref={fileInput}
          type="file"
          accept=".csv,text/csv"
          aria-invalid={missingFile || undefined}
          className="text-sm file:mr-3 file:rounded-full file:border-0 file:bg-paper-deep file:px-4 file:py-2 file:font-bold file:text-ink"
          onChange={(event) => {
            setFile(event.target.files?.[0] ?? null);
            setMissingFile(false);
            create.reset();
          }}
        />
        {missingFile ? <p className="text-sm font-semibold text-danger">Choose a CSV file to upload.</p> : null}
      </div>
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Library name" value={name} onValueChange={setName} maxLength={120} hint="Empty: the file's # name line." />
        <SelectField label="Who can use it" value={scope} onValueChange={setScope} options={SCOPE_OPTIONS} />
      </div>
      <details className="text-sm">
        <summary className="cursor-pointer font-bold text-ink-soft">Library facts (when the file has no # lines for them)</summary>
        <div className="mt-3 grid gap-4 sm:grid-cols-2">
          <TextField label="Design wavelength (nm)" inputMode="decimal" value={wavelengthNm} onValueChange={setWavelengthNm} />
          <TextField label="Period (nm)" inputMode="decimal" value={periodNm} onValueChange={setPeriodNm} />
          <TextField label="Pillar height (nm)" inputMode="decimal" value={heightNm} onValueChange={setHeightNm} />
          <TextField label="Material note" value={material} onValueChange={setMaterial} maxLength={300} />
        </div>
      </details>
      {error ? (
        <Banner title="The library was not accepted">
          <p>{error.message}</p>
          {problems.length > 0 ? (
            <ul aria-label="Problems in the file" className="mt-2 list-disc pl-5">
              {problems.map(([where, message]) => (
                <li key={where}>
                  <strong>{where}</strong>: {message}
                </li>
              ))}
            </ul>
          ) : null}
        </Banner>
      ) : null}
      <div>
        <Button type="submit" pending={create.isPending}>
          Upload library
        </Button>
      </div>
    </form>
  );
}
