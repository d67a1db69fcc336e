import type { RunEvent } from '@shared/schemas/runs';
import { formatDateTime } from '@/lib/format';

const timeFormat = new Intl.DateTimeFormat(undefined, { hour: '2-digit', minute: '2-digit', second: '2-digit' });
const formatTime = (iso: string) => timeFormat.format(new Date(iso));
import { eventMarks } from '@/features/runs/components/event-steps';
import { RunStatusBadge } from '@/features/runs/components/run-status-badge';

/** Stage names that only repeat the state the badge shows in words. */
const STATE_STAGES = new Set(['queued', 'done', 'succeeded', 'failed', 'cancelled']);

/** The run's status history, oldest first, as a timeline. */
export function RunEvents({ events }: { events: RunEvent[] }) {
  if (events.length === 0) return <p className="text-sm text-ink-soft">Nothing has happened to this run yet.</p>;
  const marks = eventMarks(events);
  return (
    <div role="region" aria-label="Status history" tabIndex={0} className="max-h-[30rem] overflow-y-auto rounded pr-1">
    <ol className="relative ml-2 flex flex-col gap-3 border-l-2 border-line pl-5">
      {events.map((event, i) => (
        <li key={`${event.at}-${i}`} className="relative">
          <span aria-hidden="true" className="absolute top-1.5 -left-[1.72rem] size-3 rounded-full bg-card ring-2 ring-line-strong" />
          <div className="flex flex-wrap items-center gap-x-2 gap-y-1">
            {marks[i] === 'done' ? (
              <span className="rounded-full px-2 py-0.5 text-xs font-bold text-ink-soft ring-1 ring-line-strong ring-inset">Step done</span>
            ) : (
              <RunStatusBadge status={event.status} />
            )}
            {event.stage && !STATE_STAGES.has(event.stage) ? <span className="text-sm font-bold">{event.stage}</span> : null}
            <time dateTime={event.at} title={formatDateTime(event.at)} className="ml-auto text-xs text-ink-soft tabular-nums">
              {formatTime(event.at)}
            </time>
          </div>
          {event.message && event.message.trim().toLowerCase() !== event.stage.trim().toLowerCase() ? (
            <p className="mt-0.5 text-sm text-ink-soft">{event.message}</p>
          ) : null}
        </li>
      ))}
    </ol>
    </div>
  );
}
