import { useEffect, useId, useState } from 'react';
import { RUN_STATUSES } from '@shared/schemas/runs';
import { plainSelectClasses } from '@/components/ui/field';
import { useDebouncedValue } from '@/hooks/use-debounced-value';
import type { RunListFilters } from '@/features/runs/api/query-keys';
import { STATUS_LABELS } from '@/features/runs/components/format-run';

const statusOptions: { value: RunListFilters['status']; label: string }[] = [
  { value: 'all', label: 'Any status' },
  ...RUN_STATUSES.map((status) => ({ value: status, label: STATUS_LABELS[status] })),
];

function parseRevision(text: string): number | null {
  return /^[1-9][0-9]{0,8}$/.test(text) ? Number(text) : null;
}

interface RunListControlsProps {
  filters: RunListFilters;
  onChange: (next: Partial<RunListFilters>) => void;
}

export function RunListControls({ filters, onChange }: RunListControlsProps) {
  const statusId = useId();
  const revisionId = useId();
  const revisionHintId = useId();
  const [revisionText, setRevisionText] = useState(filters.revision ? String(filters.revision) : '');
  const debounced = useDebouncedValue(revisionText.trim(), 300);

  useEffect(() => {
    setRevisionText((current) => (parseRevision(current.trim()) === filters.revision ? current : filters.revision ? String(filters.revision) : ''));
  }, [filters.revision]);

  useEffect(() => {
    const next = parseRevision(debounced);
    if (next !== filters.revision && (next !== null || debounced === '')) onChange({ revision: next });
  }, [debounced]);

  const invalid = revisionText.trim() !== '' && parseRevision(revisionText.trim()) === null;

  return (
    <div className="mb-5 flex flex-wrap items-end gap-4">
      <div className="flex flex-col gap-1.5">
        <label htmlFor={statusId} className="text-sm font-bold">
          Status
        </label>
        <select
          id={statusId}
          value={filters.status}
          onChange={(event) => onChange({ status: event.target.value as RunListFilters['status'] })}
          className={`${plainSelectClasses} h-10`}
        >
          {statusOptions.map((option) => (
            <option key={option.value} value={option.value}>
              {option.label}
            </option>
          ))}
        </select>
      </div>
      <div className="flex flex-col gap-1.5">
        <label htmlFor={revisionId} className="text-sm font-bold">
          Revision
        </label>
        <input
          id={revisionId}
          type="text"
          inputMode="numeric"
          value={revisionText}
          onChange={(event) => setRevisionText(event.target.value)}
          placeholder="Any"
          aria-invalid={invalid || undefined}
          aria-describedby={revisionHintId}
          className="h-10 w-28 rounded-xl bg-card px-3.5 ring-1 ring-line-strong ring-inset placeholder:text-ink-faint focus:ring-2 focus:ring-teal focus:outline-none aria-invalid:ring-2 aria-invalid:ring-danger"
        />
      </div>
      <p id={revisionHintId} className={`pb-2.5 text-xs ${invalid ? 'font-semibold text-danger' : 'text-ink-soft'}`}>
        {invalid ? 'A revision is a whole number: 1, 2, 3…' : 'Leave the revision empty to see runs of every revision.'}
      </p>
    </div>
  );
}
