import { Fragment, type ReactNode } from 'react';
import { Link } from 'react-router-dom';
import type { DesignChange, Revision } from '@shared/schemas/revisions';
import { Badge } from '@/components/ui/badge';
import { Card } from '@/components/ui/card';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { formatDateTime } from '@/lib/format';
import { signedChange } from '@shared/design-values';
import { useUploads } from '@/features/designs/api/get-uploads';
import { describeField, formatValue, valueKey } from '@/features/designs/utils/design-fields';
import { changeTouches, flattenDesign, mergePaths } from '@/features/designs/utils/flatten-design';

function RevisionHeader({ projectId, revision, side }: { projectId: number; revision: Revision; side: 'Left' | 'Right' }) {
  return (
    <div className="flex min-w-0 flex-col gap-1 rounded-2xl bg-paper px-4 py-3">
      <span className="text-xs font-bold tracking-wide text-ink-soft uppercase">{side}</span>
      <span className="text-lg font-extrabold">Revision {revision.number}</span>
      <span className="break-words">{revision.designName}</span>
      <span className="text-sm text-ink-soft">{revision.message ? `“${revision.message}”` : 'No message'}</span>
      <span className="text-sm text-ink-soft">
        {revision.createdBy?.name ?? 'A former member'}, <time dateTime={revision.createdAt}>{formatDateTime(revision.createdAt)}</time>
      </span>
      <span className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-sm">
        <Link to={paths.projects.design.getHref(projectId, revision.number)} className="font-bold text-teal underline-offset-4 hover:underline">
          Open in the composer
        </Link>
        {revision.runCount > 0 ? (
          <Link to={paths.projects.runs.getHref(projectId)} className="font-bold text-teal underline-offset-4 hover:underline">
            {revision.runCount} {revision.runCount === 1 ? 'run' : 'runs'} — see Runs
          </Link>
        ) : (
          <span className="text-ink-soft">Not run yet</span>
        )}
      </span>
    </div>
  );
}

/**
 * One change in plain words, e.g. “Channel B, term 1 (Tilt): deflection θx changed from 10° to 15° (+5°)”;
 * uploaded pictures by file name when `uploadNames` knows them.
 */
export function describeChange(change: DesignChange, a: Revision, b: Revision, uploadNames?: ReadonlyMap<number, string>): ReactNode {
  const words = { key: valueKey(change.path), uploadNames };
  const absentA = change.a === null || change.a === undefined;
  const absentB = change.b === null || change.b === undefined;
  const field = describeField(change.path, absentB ? a.design : b.design);
  const fieldA = describeField(change.path, a.design);
  const isTerm = /^channels\.[ab]\.terms\.\d+$/.test(change.path);
  if (absentA) {
    return (
      <>
        <strong>{field.label}</strong> {isTerm ? 'added' : `set to ${formatValue(change.b, field.unit, words)}`} in revision {b.number}
        {isTerm ? '' : ' (not given before)'}
      </>
    );
  }
  if (absentB) {
    return (
      <>
        <strong>{fieldA.label}</strong> {isTerm ? 'removed' : `(${formatValue(change.a, fieldA.unit, words)}) left out`} in revision {b.number}
      </>
    );
  }
  // Angles and lengths change by so much, in their unit (a ratio of angles means nothing).
  const difference = typeof change.a === 'number' && typeof change.b === 'number' && words.key !== 'upload' ? signedChange(change.a, change.b, field.unit) : null;
  const trend = difference ? ` (${difference})` : '';
  return (
    <>
      <strong>{field.label}</strong> changed from {formatValue(change.a, fieldA.unit, words)} to {formatValue(change.b, field.unit, words)}
      {trend}
    </>
  );
}

interface RevisionComparisonProps {
  projectId: number;
  a: Revision;
  b: Revision;
  changes: DesignChange[];
}

export function RevisionComparison({ projectId, a, b, changes }: RevisionComparisonProps) {
  const uploads = useUploads(projectId);
  // The changes name uploaded pictures by file name: wait for the names rather than show bare ids first.
  if (uploads.isPending) return <PageLoader label={`Comparing revisions ${a.number} and ${b.number}`} />;
  const uploadNames = uploads.data ? new Map(uploads.data.map((u) => [u.id, u.name])) : undefined;
  const leavesA = flattenDesign(a.design);
  const leavesB = flattenDesign(b.design);
  const rows = mergePaths(leavesA, leavesB).filter((path) => path !== 'format');
  const sections = new Map<string, string[]>();
  for (const path of rows) {
    const section = describeField(path, leavesB.has(path) ? b.design : a.design).section;
    sections.set(section, [...(sections.get(section) ?? []), path]);
  }

  return (
    <div className="flex flex-col gap-6">
      <div className="grid gap-3 md:grid-cols-2">
        <RevisionHeader projectId={projectId} revision={a} side="Left" />
        <RevisionHeader projectId={projectId} revision={b} side="Right" />
      </div>

      <Card
        title={changes.length === 0 ? 'No differences' : `${changes.length} ${changes.length === 1 ? 'change' : 'changes'}`}
        description={changes.length === 0 ? 'The two revisions hold the same design.' : `From revision ${a.number} to revision ${b.number}.`}
      >
        {changes.length ? (
          <ul className="flex flex-col gap-1.5 text-sm">
            {changes.map((change) => (
              <li key={change.path} className="flex gap-2">
                <span aria-hidden="true" className="mt-1.5 size-2 shrink-0 rounded-full bg-ember" />
                <span>{describeChange(change, a, b, uploadNames)}</span>
              </li>
            ))}
          </ul>
        ) : null}
      </Card>

      <Card title="All parameters" description="Changed rows are marked.">
        <div className="overflow-x-auto">
          <table className="w-full min-w-[40rem] text-sm">
            <caption className="sr-only">
              Parameters of revision {a.number} and revision {b.number} side by side
            </caption>
            <thead className="border-b border-line text-ink-soft">
              <tr>
                <th scope="col" className="px-3 py-2.5 text-left font-bold">
                  Parameter
                </th>
                <th scope="col" className="px-3 py-2.5 text-left font-bold">
                  Revision {a.number}
                </th>
                <th scope="col" className="px-3 py-2.5 text-left font-bold">
                  Revision {b.number}
                </th>
              </tr>
            </thead>
            <tbody>
              {[...sections].map(([section, paths]) => (
                <Fragment key={section}>
                  <tr>
                    <th scope="colgroup" colSpan={3} className="bg-paper px-3 pt-4 pb-1.5 text-left text-xs font-extrabold tracking-wide text-ink-soft uppercase">
                      {section}
                    </th>
                  </tr>
                  {paths.map((path) => {
                    const changed = changes.some((change) => changeTouches(change.path, path));
                    const fieldA = describeField(path, a.design);
                    const fieldB = describeField(path, b.design);
                    return (
                      <tr key={path} className={`border-b border-line/60 ${changed ? 'bg-ember-wash' : ''}`}>
                        <th scope="row" className="px-3 py-2 text-left font-semibold">
                          <span className="flex flex-wrap items-center gap-2">
                            {(leavesB.has(path) ? fieldB : fieldA).shortLabel}
                            {changed ? <Badge tone="ember">Changed</Badge> : null}
                          </span>
                        </th>
                        <td className={`px-3 py-2 tabular-nums ${changed ? 'font-bold' : ''}`}>
                          {formatValue(leavesA.get(path), fieldA.unit, { key: valueKey(path), uploadNames })}
                        </td>
                        <td className={`px-3 py-2 tabular-nums ${changed ? 'font-bold' : ''}`}>{formatValue(leavesB.get(path), fieldB.unit, { key: valueKey(path), uploadNames })}</td>
                      </tr>
                    );
                  })}
                </Fragment>
              ))}
            </tbody>
          </table>
        </div>
      </Card>
    </div>
  );
}
