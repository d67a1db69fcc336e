import type { RunStatus } from '@shared/schemas/runs';

const barTone: Record<RunStatus, string> = {
  queued: 'bg-ink-faint',
  running: 'bg-teal',
  succeeded: 'bg-success',
  failed: 'bg-danger',
  cancelled: 'bg-ink-faint',
};

interface RunProgressProps {
  progress: number;
  status: RunStatus;
  label: string;
  size?: 'sm' | 'lg';
}

/** Progress bar with the percent written beside it; exposed as a progressbar with its value. */
export function RunProgress({ progress, status, label, size = 'sm' }: RunProgressProps) {
  const percent = Math.round(Math.min(1, Math.max(0, progress)) * 100);
  return (
    <div className={`flex items-center gap-2.5 ${size === 'lg' ? 'w-full' : 'min-w-32'}`}>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent}
        aria-valuetext={`${percent} %`}
        className={`flex-1 overflow-hidden rounded-full bg-paper-deep ring-1 ring-line ring-inset ${size === 'lg' ? 'h-3' : 'h-2'}`}
      >
        <div className={`h-full rounded-full transition-[width] duration-500 ${barTone[status]}`} style={{ width: `${percent}%` }} />
      </div>
      <span className={`w-14 shrink-0 text-right font-bold whitespace-nowrap tabular-nums ${size === 'lg' ? 'text-lg' : 'text-sm'}`} aria-hidden="true">
        {percent} %
      </span>
    </div>
  );
}
