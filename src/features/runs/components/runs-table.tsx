import { Link } from 'react-router-dom';
import type { ListRunsQuery, RunSummary } from '@shared/schemas/runs';
import { SortHeader } from '@/components/ui/sort-header';
import { paths } from '@/config/paths';
import { formatDateTime, formatRelative } from '@/lib/format';
import type { RunListFilters } from '@/features/runs/api/query-keys';
import { formatDb, formatDuration, formatPercent } from '@/features/runs/components/format-run';
import { RunProgress } from '@/features/runs/components/run-progress';
import { RunStatusBadge } from '@/features/runs/components/run-status-badge';

type SortKey = ListRunsQuery['sort'];

interface RunsTableProps {
  projectId: number;
  runs: RunSummary[];
  filters: RunListFilters;
  onSort: (sort: SortKey) => void;
  stale?: boolean;
  /** Runs ticked for comparison (at most two); the tick column shows only with `onToggle`. */
  selected?: number[];
  onToggle?: (runId: number) => void;
}

function PlainHeader({ children, align = 'left' }: { children: string; align?: 'left' | 'right' }) {
  return (
    <th scope="col" className={`px-3 py-3 font-bold whitespace-nowrap ${align === 'right' ? 'text-right' : 'text-left'}`}>
      {children}
    </th>
  );
}

export function RunsTable({ projectId, runs, filters, onSort, stale = false, selected = [], onToggle }: RunsTableProps) {
  return (
    <div
      className={`relative overflow-x-auto rounded-card bg-card shadow-card ring-1 ring-line/70 transition-opacity ${stale ? 'opacity-60' : ''}`}
    >
      <table className="w-full min-w-[58rem] text-sm" aria-busy={stale || undefined}>
        <caption className="sr-only">Runs of this project</caption>
        <thead className="border-b border-line text-ink-soft">
          <tr>
            {onToggle ? (
              <th scope="col" className="w-10 px-3 py-3 text-left font-bold">
                <span className="sr-only">Compare</span>
              </th>
            ) : null}
            <SortHeader label="Run" sortKey="queuedAt" sort={filters} onSort={onSort} className="px-3" />
            <SortHeader label="Status" sortKey="status" sort={filters} onSort={onSort} className="px-3" />
            <PlainHeader>Progress</PlainHeader>
            <SortHeader label="Revision" sortKey="revisionNumber" sort={filters} onSort={onSort} className="px-3" align="right" />
            <PlainHeader>Started by</PlainHeader>
            <SortHeader label="Duration" sortKey="durationMs" sort={filters} onSort={onSort} className="px-3" align="right" />
            <PlainHeader align="right">Efficiency A / B (window or wavefront)</PlainHeader>
            <PlainHeader align="right">Crosstalk, worse channel</PlainHeader>
            <PlainHeader align="right">Zero order, worse channel</PlainHeader>
          </tr>
        </thead>
        <tbody className="divide-y divide-line/70">
          {runs.map((run) => (
            <tr key={run.id} className={`align-middle ${selected.includes(run.id) ? 'bg-ember-wash/50' : 'hover:bg-paper/60'}`}>
              {onToggle ? (
                <td className="px-3 py-3">
                  <input
                    type="checkbox"
                    className="size-4 accent-[var(--color-ember)]"
                    checked={selected.includes(run.id)}
                    disabled={!selected.includes(run.id) && selected.length >= 2}
                    onChange={() => onToggle(run.id)}
                    aria-label={`Compare run ${run.id}`}
                  />
                </td>
              ) : null}
              <td className="px-3 py-3">
                <Link
                  to={paths.projects.run.getHref(projectId, run.id)}
                  className="rounded font-extrabold text-ink decoration-ember decoration-2 underline-offset-4 hover:underline"
                >
                  <span className="whitespace-nowrap">Run {run.id}</span>
                </Link>
                <time dateTime={run.queuedAt} title={formatDateTime(run.queuedAt)} className="block text-xs whitespace-nowrap text-ink-soft">
                  {formatRelative(run.queuedAt)}
                </time>
              </td>
              <td className="px-3 py-3">
                <RunStatusBadge status={run.status} />
              </td>
              <td className="px-3 py-3">
                <RunProgress progress={run.progress} status={run.status} label={`Progress of run ${run.id}`} />
                {run.status === 'running' || run.status === 'queued' ? (
                  <span className="mt-0.5 block text-xs text-ink-soft">{run.stage || 'waiting for a worker'}</span>
                ) : null}
              </td>
              <td className="px-3 py-3 text-right tabular-nums">{run.revisionNumber}</td>
              <td className="px-3 py-3 whitespace-nowrap">{run.startedBy?.name ?? <span className="text-ink-soft">a former member</span>}</td>
              <td className="px-3 py-3 text-right tabular-nums whitespace-nowrap">{formatDuration(run.durationMs)}</td>
              <td className="px-3 py-3 text-right tabular-nums whitespace-nowrap">
                <span className="block">
                  <span className="text-xs text-ink-soft">A </span>
                  {formatPercent(run.headline.efficiencyA)}
                </span>
                <span className="block">
                  <span className="text-xs text-ink-soft">B </span>
                  {formatPercent(run.headline.efficiencyB)}
                </span>
              </td>
              <td className="px-3 py-3 text-right tabular-nums whitespace-nowrap">{formatDb(run.headline.crosstalkDb)}</td>
              <td className="px-3 py-3 text-right tabular-nums whitespace-nowrap">{formatPercent(run.headline.zeroOrder, 2)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
