import { efficiencyHeadline } from '@/features/runs/components/run-status-panel';
import type { ReactNode } from 'react';
import { Link } from 'react-router-dom';
import type { RunDetail } from '@shared/schemas/runs';
import { Card } from '@/components/ui/card';
import { paths } from '@/config/paths';
import { formatDateTime, formatRelative } from '@/lib/format';
import { artifactHref } from '@/features/runs/api/artifact-href';
import { useRun } from '@/features/runs/api/get-run';
import { useRuns } from '@/features/runs/api/get-runs';
import { formatDb, formatPercent } from '@/features/runs/components/format-run';

const FINISHED_FIRST = { status: 'succeeded', revision: null, sort: 'queuedAt', dir: 'desc' } as const;
const THUMBNAILS = [
  { name: 'farfield_a.png', title: 'Under input A' },
  { name: 'farfield_b.png', title: 'Under input B' },
  { name: 'farfield_extra.png', title: 'Under the third input' },
] as const;

function Figure({ term, children }: { term: string; children: ReactNode }) {
  return (
    <div className="flex flex-col gap-0.5 rounded-2xl bg-paper px-3 py-2">
      <dt className="text-xs font-bold text-ink-soft">{term}</dt>
      <dd className="text-lg font-extrabold tabular-nums">{children}</dd>
    </div>
  );
}

function Thumbnails({ projectId, run }: { projectId: number; run: RunDetail }) {
  const shown = THUMBNAILS.filter(({ name }) => run.artifacts.some((artifact) => artifact.name === name));
  if (!shown.length) return <p className="text-sm text-ink-soft">{run.filesDeletedAt ? 'Its files were deleted, previews with them.' : 'It has no far-field previews.'}</p>;
  return (
    <ul className="grid grid-cols-3 gap-3">
      {shown.map(({ name, title }) => (
        <li key={name}>
          <Link to={`${paths.projects.run.getHref(projectId, run.id)}#far-fields`} className="group flex flex-col gap-1 rounded-xl">
            <img src={artifactHref(projectId, run.id, name)} alt={`Far field of run ${run.id}, ${title.toLowerCase()}`} className="aspect-square w-full rounded-xl bg-ink object-contain ring-1 ring-line group-hover:ring-2 group-hover:ring-ember" loading="lazy" />
            <span className="text-xs font-bold text-ink-soft group-hover:text-ink">{title}</span>
          </Link>
        </li>
      ))}
    </ul>
  );
}

/** The project's latest run that succeeded: its far-field thumbnails and headline figures, with links to it and to a comparison with the one before. */
export function LatestRunCard({ projectId }: { projectId: number }) {
  const runs = useRuns(projectId, FINISHED_FIRST);
  const [latest, before] = runs.data?.runs ?? [];
  const run = useRun(projectId, latest?.id ?? null);
  if (runs.isPending || runs.isError || !latest) {
    return runs.data ? (
      <Card title="Latest finished run">
        <p className="text-sm text-ink-soft">No run has finished yet. Save a revision on the Design tab and start a run: its far fields and figures will show here.</p>
      </Card>
    ) : null;
  }
  const { headline } = latest;
  return (
    <Card
      title={`Latest finished run: run ${latest.id}`}
      description={
        <>
          Revision {latest.revisionNumber}, finished{' '}
          <time dateTime={latest.finishedAt ?? latest.queuedAt} title={formatDateTime(latest.finishedAt ?? latest.queuedAt)}>
            {formatRelative(latest.finishedAt ?? latest.queuedAt)}
          </time>
          .
        </>
      }
      actions={
        <>
          {before ? (
            <Link to={paths.projects.compareRuns.getHref(projectId, before.id, latest.id)} className="rounded-full px-3 py-1.5 text-sm font-bold text-teal ring-1 ring-line hover:bg-paper-deep">
              Compare with run {before.id}
            </Link>
          ) : null}
          <Link to={paths.projects.run.getHref(projectId, latest.id)} className="rounded-full bg-ink px-3 py-1.5 text-sm font-bold text-card hover:bg-ink/85">
            Open run {latest.id}
          </Link>
        </>
      }
    >
      <div className="grid gap-5 lg:grid-cols-[minmax(0,1.4fr)_minmax(0,1fr)]">
        {run.data ? <Thumbnails projectId={projectId} run={run.data} /> : <div className="aspect-[3/1] rounded-xl bg-paper" aria-hidden="true" />}
        <dl className="grid grid-cols-2 content-start gap-2">
          <Figure term={run.data ? efficiencyHeadline(run.data, 'a').label : 'Efficiency A'}>{formatPercent(headline.efficiencyA)}</Figure>
          <Figure term={run.data ? efficiencyHeadline(run.data, 'b').label : 'Efficiency B'}>{formatPercent(headline.efficiencyB)}</Figure>
          <Figure term="Crosstalk, worse channel">{formatDb(headline.crosstalkDb)}</Figure>
          <Figure term="Zero order, worse channel">{formatPercent(headline.zeroOrder, 2)}</Figure>
        </dl>
      </div>
    </Card>
  );
}
