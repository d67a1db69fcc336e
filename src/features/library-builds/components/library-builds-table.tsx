import { Link } from 'react-router-dom';
import type { LibraryBuild } from '@shared/schemas/library-builds';
import { formatDateTime, formatRelative } from '@/lib/format';
import { RunProgress } from '@/features/runs/components/run-progress';
import { RunStatusBadge } from '@/features/runs/components/run-status-badge';

/** "atom 12 of 400", or what the build is waiting for. */
export function progressText(build: LibraryBuild): string {
  if (build.status === 'queued') return 'waiting for a worker';
  if (!build.progress) return build.status === 'running' ? 'starting' : '—';
  return `atom ${build.progress.atom} of ${build.progress.atoms}`;
}

/** The project's library builds, newest first: status, progress, who started each and when. */
export function LibraryBuildsTable({ builds, buildHref }: { builds: LibraryBuild[]; buildHref: (buildId: number) => string }) {
  return (
    <div className="overflow-x-auto rounded-card bg-card shadow-card ring-1 ring-line/70">
      <table className="w-full text-sm">
        <caption className="sr-only">Library builds of this project</caption>
        <thead className="text-left text-ink-soft">
          <tr>
            <th scope="col" className="px-4 py-3 font-bold">Build</th>
            <th scope="col" className="px-4 py-3 font-bold">Status</th>
            <th scope="col" className="px-4 py-3 font-bold">Progress</th>
            <th scope="col" className="px-4 py-3 font-bold">Started by</th>
            <th scope="col" className="px-4 py-3 font-bold">When</th>
          </tr>
        </thead>
        <tbody>
          {builds.map((build) => (
            <tr key={build.id} className="border-t border-line/70">
              <th scope="row" className="px-4 py-3 text-left">
                <Link to={buildHref(build.id)} className="font-bold text-ink underline decoration-line-strong underline-offset-4 hover:decoration-ember">
                  {build.name || `Build ${build.id}`}
                </Link>
                <p className="mt-0.5 font-normal text-ink-soft">
                  λ {build.spec.wavelengthNm} nm, P {build.spec.periodNm} nm, {build.spec.harmonics} × {build.spec.harmonics} harmonics
                  {build.scope === 'personal' ? ', personal' : ''}
                </p>
              </th>
              <td className="px-4 py-3">
                <RunStatusBadge status={build.status} />
              </td>
              <td className="px-4 py-3">
                <RunProgress progress={build.status === 'succeeded' ? 1 : (build.progress?.fraction ?? 0)} status={build.status} label={`Progress of ${build.name || `build ${build.id}`}`} />
                <p className="mt-0.5 text-xs text-ink-soft">{progressText(build)}</p>
              </td>
              <td className="px-4 py-3 text-ink-soft">{build.createdBy.name}</td>
              <td className="px-4 py-3 text-ink-soft">
                <time dateTime={build.createdAt} title={formatDateTime(build.createdAt)}>
                  {formatRelative(build.createdAt)}
                </time>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
