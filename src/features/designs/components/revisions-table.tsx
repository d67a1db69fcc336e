import { Link } from 'react-router-dom';
import type { RevisionSummary } from '@shared/schemas/revisions';
import { Button } from '@/components/ui/button';
import { paths } from '@/config/paths';
import { formatDateTime, formatRelative } from '@/lib/format';

interface RevisionsTableProps {
  projectId: number;
  revisions: RevisionSummary[];
  selected: number[];
  onToggle: (number: number) => void;
  canRun: boolean;
  runningNumber: number | null;
  onRun: (number: number) => void;
}

export function RevisionsTable({ projectId, revisions, selected, onToggle, canRun, runningNumber, onRun }: RevisionsTableProps) {
  return (
    <div className="overflow-x-auto rounded-card bg-card shadow-card ring-1 ring-line/70">
      <table className="w-full min-w-[52rem] text-sm">
        <caption className="sr-only">Saved revisions of the design, newest first. Tick two to compare them.</caption>
        <thead className="border-b border-line text-ink-soft">
          <tr>
            <th scope="col" className="w-12 px-4 py-3 text-left font-bold">
              <span className="sr-only">Compare</span>
            </th>
            <th scope="col" className="px-4 py-3 text-left font-bold">
              Revision
            </th>
            <th scope="col" className="px-4 py-3 text-left font-bold">
              Message
            </th>
            <th scope="col" className="px-4 py-3 text-left font-bold">
              Design
            </th>
            <th scope="col" className="px-4 py-3 text-left font-bold">
              Saved by
            </th>
            <th scope="col" className="px-4 py-3 text-right font-bold">
              Runs
            </th>
            <th scope="col" className="px-4 py-3 text-right font-bold">
              <span className="sr-only">Actions</span>
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-line/70">
          {revisions.map((revision) => {
            const checked = selected.includes(revision.number);
            const blocked = !checked && selected.length >= 2;
            return (
              <tr key={revision.id} className={`align-top ${checked ? 'bg-ember-wash/50' : 'hover:bg-paper/60'}`}>
                <td className="px-4 py-3.5">
                  <input
                    type="checkbox"
                    className="size-4 accent-[var(--color-ember)]"
                    checked={checked}
                    disabled={blocked}
                    onChange={() => onToggle(revision.number)}
                    aria-label={`Compare revision ${revision.number}`}
                  />
                </td>
                <th scope="row" className="px-4 py-3.5 text-left font-extrabold whitespace-nowrap">
                  <Link
                    to={paths.projects.design.getHref(projectId, revision.number)}
                    className="rounded decoration-ember decoration-2 underline-offset-4 hover:underline"
                  >
                    Revision {revision.number}
                  </Link>
                </th>
                <td className="max-w-sm px-4 py-3.5">
                  {revision.message ? <p className="line-clamp-3">{revision.message}</p> : <span className="text-ink-faint">No message</span>}
                </td>
                <td className="max-w-xs px-4 py-3.5 break-words">{revision.designName}</td>
                <td className="px-4 py-3.5 whitespace-nowrap text-ink-soft">
                  <span className="block text-ink">{revision.createdBy?.name ?? 'A former member'}</span>
                  <time dateTime={revision.createdAt} title={formatDateTime(revision.createdAt)}>
                    {formatRelative(revision.createdAt)}
                  </time>
                </td>
                <td className="px-4 py-3.5 text-right tabular-nums">{revision.runCount}</td>
                <td className="px-4 py-3.5">
                  <div className="flex justify-end gap-2">
                    <Link
                      to={paths.projects.design.getHref(projectId, revision.number)}
                      className="inline-flex h-8 items-center rounded-full px-3 text-sm font-bold whitespace-nowrap text-ink hover:bg-paper-deep"
                      aria-label={`Open revision ${revision.number} in the composer`}
                    >
                      Open
                    </Link>
                    {canRun ? (
                      <Button
                        variant="secondary"
                        size="sm"
                        pending={runningNumber === revision.number}
                        disabled={runningNumber !== null && runningNumber !== revision.number}
                        onClick={() => onRun(revision.number)}
                        aria-label={`Run revision ${revision.number}`}
                      >
                        Run
                      </Button>
                    ) : null}
                  </div>
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
