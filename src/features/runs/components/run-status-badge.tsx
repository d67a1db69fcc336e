import type { RunStatus } from '@shared/schemas/runs';
import { STATUS_LABELS } from '@/features/runs/components/format-run';

const styles: Record<RunStatus, string> = {
  queued: 'bg-paper-deep text-ink-soft ring-line-strong',
  running: 'bg-teal-wash text-teal ring-teal/30',
  succeeded: 'bg-success-wash text-success ring-success/30',
  failed: 'bg-danger-wash text-danger ring-danger/30',
  cancelled: 'bg-ink-mist/60 text-ink-soft ring-ink-faint/40',
};

function StatusGlyph({ status }: { status: RunStatus }) {
  const common = { viewBox: '0 0 16 16', className: 'size-3.5 shrink-0', 'aria-hidden': true, fill: 'none', stroke: 'currentColor', strokeWidth: 2 } as const;
  switch (status) {
    case 'queued':
      return (
        <svg {...common}>
          <circle cx="8" cy="8" r="5.5" strokeDasharray="2.4 2.2" />
        </svg>
      );
    case 'running':
      return (
        <svg {...common} className="size-3.5 shrink-0 animate-spin motion-reduce:animate-none">
          <circle cx="8" cy="8" r="5.5" strokeOpacity="0.3" />
          <path d="M13.5 8A5.5 5.5 0 0 0 8 2.5" strokeLinecap="round" />
        </svg>
      );
    case 'succeeded':
      return (
        <svg {...common}>
          <path d="m3.5 8.5 3 3 6-7" strokeLinecap="round" strokeLinejoin="round" />
        </svg>
      );
    case 'failed':
      return (
        <svg {...common}>
          <path d="M8 3.5v5.5M8 12v.5" strokeLinecap="round" />
        </svg>
      );
    case 'cancelled':
      return (
        <svg {...common}>
          <path d="M4.5 8h7" strokeLinecap="round" />
        </svg>
      );
  }
}

/** Run status as a word with its own shape and colour, so it reads without colour too. */
export function RunStatusBadge({ status, size = 'sm' }: { status: RunStatus; size?: 'sm' | 'md' }) {
  return (
    <span
      className={`inline-flex items-center gap-1.5 rounded-full font-bold whitespace-nowrap ring-1 ring-inset ${styles[status]} ${
        size === 'md' ? 'px-3 py-1 text-sm' : 'px-2.5 py-0.5 text-xs'
      }`}
    >
      <StatusGlyph status={status} />
      {STATUS_LABELS[status]}
    </span>
  );
}
