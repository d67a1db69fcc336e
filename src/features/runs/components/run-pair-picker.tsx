import { useId } from 'react';
import type { RunSummary } from '@shared/schemas/runs';
import { Button } from '@/components/ui/button';
import { plainSelectClasses } from '@/components/ui/field';
import { formatRelative } from '@/lib/format';
import { STATUS_LABELS } from '@/features/runs/components/format-run';

interface RunPairPickerProps {
  runs: RunSummary[];
  a: number | null;
  b: number | null;
  onChange: (a: number | null, b: number | null) => void;
}

const describe = (run: RunSummary) => `Run ${run.id} · revision ${run.revisionNumber} · ${STATUS_LABELS[run.status]} · ${formatRelative(run.queuedAt)}`;

/** Two choosers of the project's runs (any revisions) and a button that swaps them. */
export function RunPairPicker({ runs, a, b, onChange }: RunPairPickerProps) {
  const leftId = useId();
  const rightId = useId();
  const chooser = (id: string, label: string, value: number | null, other: number | null, pick: (id: number | null) => void) => (
    <div className="flex min-w-0 flex-col gap-1">
      <label htmlFor={id} className="text-sm font-bold">
        {label}
      </label>
      <select id={id} value={value ?? ''} onChange={(event) => pick(event.target.value ? Number(event.target.value) : null)} className={`${plainSelectClasses} h-10 max-w-full`}>
        <option value="">Choose a run</option>
        {runs.map((run) => (
          <option key={run.id} value={run.id} disabled={run.id === other}>
            {describe(run)}
          </option>
        ))}
      </select>
    </div>
  );
  return (
    <div className="flex flex-wrap items-end gap-3">
      {chooser(leftId, 'Run a (before)', a, b, (id) => onChange(id, b))}
      <Button variant="secondary" size="sm" className="mb-0.5" onClick={() => onChange(b, a)} disabled={a === null && b === null}>
        Swap a and b
      </Button>
      {chooser(rightId, 'Run b (after)', b, a, (id) => onChange(a, id))}
    </div>
  );
}
