import type { AuditEvent, AuditPerson } from '@shared/schemas/audit';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { formatDateTime, formatRelative } from '@/lib/format';
import { AUDIT_KIND_INFO, describeAuditEvent } from '@/features/admin/components/audit-kinds';

function Person({ person, fallback }: { person: AuditPerson | null; fallback: string }) {
  if (!person) return <span className="text-ink-soft">{fallback}</span>;
  if (person.name === null) return <span className="text-ink-soft">Deleted account #{person.id}</span>;
  return (
    <>
      <span className="font-bold">{person.name}</span>
      <span className="block text-xs break-all text-ink-soft">{person.email}</span>
    </>
  );
}

function About({ event }: { event: AuditEvent }) {
  const summary = describeAuditEvent(event);
  const otherSubject = event.subject && event.subject.id !== event.actor?.id ? event.subject : null;
  return (
    <div className="space-y-0.5">
      {otherSubject ? (
        <p>
          <Person person={otherSubject} fallback="" />
        </p>
      ) : null}
      {event.project ? <p className="text-ink-soft">Project “{event.project.name ?? `#${event.project.id} (deleted)`}”</p> : null}
      {summary ? <p className="break-words">{summary}</p> : null}
    </div>
  );
}

export function AuditTable({ events, stale }: { events: AuditEvent[]; stale: boolean }) {
  return (
    <div className={`relative overflow-x-auto transition-opacity ${stale ? 'opacity-60' : ''}`}>
      <table className="w-full min-w-[54rem] text-sm">
        <caption className="sr-only">Security events, newest first</caption>
        <thead className="border-b border-line text-left text-ink-soft">
          <tr>
            <th scope="col" className="py-2.5 pr-4 font-bold">
              When
            </th>
            <th scope="col" className="py-2.5 pr-4 font-bold">
              Event
            </th>
            <th scope="col" className="py-2.5 pr-4 font-bold">
              Who
            </th>
            <th scope="col" className="py-2.5 pr-4 font-bold">
              About
            </th>
            <th scope="col" className="py-2.5 font-bold">
              From
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line/70 align-top">
          {events.map((event) => {
            const info = AUDIT_KIND_INFO[event.kind];
            return (
              <tr key={event.id}>
                <td className="py-3 pr-4 whitespace-nowrap">
                  <time dateTime={event.at} title={formatRelative(event.at)}>
                    {formatDateTime(event.at)}
                  </time>
                </td>
                <td className="py-3 pr-4 whitespace-nowrap">
                  <Badge tone={info.tone}>{info.label}</Badge>
                </td>
                <td className="py-3 pr-4">
                  <Person person={event.actor} fallback="Not signed in" />
                </td>
                <td className="max-w-md py-3 pr-4">
                  <About event={event} />
                </td>
                <td className="py-3 font-mono text-xs whitespace-nowrap">{event.address ?? '—'}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

interface AuditPagerProps {
  page: number;
  pageSize: number;
  total: number;
  onPage: (page: number) => void;
}

export function AuditPager({ page, pageSize, total, onPage }: AuditPagerProps) {
  const first = (page - 1) * pageSize + 1;
  const last = Math.min(total, page * pageSize);
  const pages = Math.max(1, Math.ceil(total / pageSize));
  return (
    <nav aria-label="Pages of the security log" className="mt-5 flex flex-wrap items-center justify-between gap-3 text-sm">
      <p className="text-ink-soft" role="status">
        {total === 0 ? 'No events' : `Events ${first}–${last} of ${total} · page ${page} of ${pages}`}
      </p>
      <div className={`flex gap-2 ${pages === 1 ? 'hidden' : ''}`}>
        <Button variant="secondary" size="sm" disabled={page <= 1} onClick={() => onPage(page - 1)}>
          Newer
        </Button>
        <Button variant="secondary" size="sm" disabled={page >= pages} onClick={() => onPage(page + 1)}>
          Older
        </Button>
      </div>
    </nav>
  );
}
