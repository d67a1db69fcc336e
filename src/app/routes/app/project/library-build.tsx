import type { QueryClient } from '@tanstack/react-query';
import { useEffect, useRef, useState } from 'react';
import { Link, useParams, type LoaderFunctionArgs } from 'react-router-dom';
import { LIBRARY_MATERIALS, type SpecMaterial } from '@shared/optics/library-builder';
import { projectRoleAllows } from '@shared/roles';
import type { LibraryBuild } from '@shared/schemas/library-builds';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClasses } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import { formatDuration } from '@/features/runs/components/format-run';
import { RunProgress } from '@/features/runs/components/run-progress';
import { RunStatusBadge } from '@/features/runs/components/run-status-badge';
import {
  isBuildActive,
  libraryBuildQueryOptions,
  useCancelLibraryBuild,
  useLibraryBuild,
  useRefreshLibrariesWhenBuilt,
} from '@/features/library-builds/api/library-builds';
import { BuildWarnings } from '@/features/library-builds/components/build-warnings';
import { BuildResults } from '@/features/library-builds/components/build-results';
import { sweepSizes } from '@/features/library-builds/utils/sweep';
import { progressText } from '@/features/library-builds/components/library-builds-table';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

const parseBuildId = (value: string | undefined) => (value && /^[1-9][0-9]{0,9}$/.test(value) ? Number(value) : null);

export const clientLoader =
  (queryClient: QueryClient) =>
  ({ params }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    const buildId = parseBuildId(params.buildId);
    if (projectId && buildId) void queryClient.prefetchQuery(libraryBuildQueryOptions(projectId, buildId));
    return null;
  };

function materialText(material: SpecMaterial): string {
  if (typeof material === 'string') return LIBRARY_MATERIALS.find((m) => m.id === material)?.name ?? material;
  if ('table' in material) {
    const rows = material.table;
    const range = rows.length ? `, ${rows[0][0]}–${rows[rows.length - 1][0]} nm` : '';
    return `${material.name}: n, k table of ${rows.length} rows${range}${material.source ? ` (${material.source})` : ''}`;
  }
  return `${material.name ? `${material.name}, ` : ''}n = ${material.n}${material.k ? ` + ${material.k}i` : ''}`;
}

/** Seconds left from the worker's own pace: atoms still to do × its seconds per atom. */
function timeLeft(build: LibraryBuild): string | null {
  const p = build.progress;
  if (!p || build.status !== 'running') return null;
  return formatDuration(Math.max(0, p.atoms - p.atom) * p.secondsPerAtom * 1000);
}

function sweepText(s: LibraryBuild['spec']): string {
  const { count, firstNm, lastNm } = sweepSizes(s);
  return `${firstNm} nm to ${lastNm} nm in steps of ${s.sweep.stepNm} nm (${count} × ${count} atoms)`;
}

function SpecFacts({ build }: { build: LibraryBuild }) {
  const s = build.spec;
  const facts: [string, string][] = [
    ['Pillar', `${materialText(s.pillar)}, ${s.heightNm} nm tall`],
    ['Substrate', materialText(s.substrate)],
    ['Superstrate', materialText(s.superstrate)],
    ['Light', s.illumination === 'substrate' ? 'through the substrate' : 'onto the pillars'],
    ['Wavelength λ, period P', `${s.wavelengthNm} nm, ${s.periodNm} nm`],
    ['Sweep of w and l', sweepText(s)],
    ['Harmonics', `${s.harmonics} × ${s.harmonics}`],
    ['Estimated time', formatDuration(build.estimateSeconds * 1000)],
    ['Started by', `${build.createdBy.name}, ${formatDateTime(build.createdAt)}`],
    ['Kept as', build.scope === 'personal' ? 'a personal library (only the one who started it)' : 'a library of this project'],
  ];
  return (
    <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-[auto_minmax(0,1fr)]">
      {facts.map(([term, value]) => (
        <div key={term} className="contents">
          <dt className="font-bold text-ink-soft">{term}</dt>
          <dd>{value}</dd>
        </div>
      ))}
    </dl>
  );
}

function BuildPage({ projectId, buildId, canDesign }: { projectId: number; buildId: number; canDesign: boolean }) {
  const query = useLibraryBuild(projectId, buildId);
  const cancel = useCancelLibraryBuild(projectId, buildId);
  const refreshLibraries = useRefreshLibrariesWhenBuilt(projectId);
  const [confirming, setConfirming] = useState(false);
  const status = query.data?.build.status;
  const seenStatus = useRef(status);
  useEffect(() => {
    if (status === 'succeeded' && seenStatus.current !== 'succeeded') void refreshLibraries();
    seenStatus.current = status;
  }, [status, refreshLibraries]);

  const back = (
    <Link to={paths.projects.atomLibraries.getHref(projectId)} className={buttonClasses('secondary', 'sm')}>
      All atom libraries
    </Link>
  );
  if (query.isPending) return <PageLoader label="Opening the library build" />;
  if (query.isError) {
    const missing = isApiError(query.error, 404);
    return (
      <Banner title={missing ? 'This project has no such library build' : 'The library build did not load'}>
        <p>{missing ? 'The address may be mistyped.' : query.error.message}</p>
        <div className="mt-3">{back}</div>
      </Banner>
    );
  }
  const { build, result } = query.data;
  const active = isBuildActive(build);
  const left = timeLeft(build);
  const title = build.name || `Library build ${build.id}`;
  return (
    <>
      <title>{`${title} · Phasewright`}</title>
      <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
        <div className="min-w-0">
          <p className="text-sm font-bold text-ink-soft">Library build</p>
          <h2 className="text-xl font-extrabold break-words">{title}</h2>
          <div className="mt-2">
            <RunStatusBadge status={build.status} size="md" />
          </div>
        </div>
        <div className="flex flex-wrap gap-2">
          {back}
          {build.libraryId !== null ? (
            <>
              <Link to={paths.projects.atomLibrary.getHref(projectId, build.libraryId)} className={buttonClasses('secondary', 'sm')}>
                Open the stored library
              </Link>
              <Link to={`${paths.projects.design.getHref(projectId)}?library=${build.libraryId}`} className={buttonClasses('primary', 'sm')}>
                Use in a design
              </Link>
            </>
          ) : null}
          {active && canDesign ? (
            <Button variant="danger" size="sm" onClick={() => setConfirming(true)}>
              Cancel build
            </Button>
          ) : null}
        </div>
      </div>
      <div className="flex flex-col gap-6">
        <Card title="Progress">
          <div className="flex flex-col gap-3">
            <RunProgress progress={build.status === 'succeeded' ? 1 : (build.progress?.fraction ?? 0)} status={build.status} label="Atoms computed" size="lg" />
            <p className="text-sm" aria-live="polite" data-testid="build-progress">
              {active ? (
                <>
                  {progressText(build)}
                  {left ? `, about ${left} left` : ''}
                  {build.progress ? ` (${build.progress.secondsPerAtom.toPrecision(2)} s per atom)` : ''}
                </>
              ) : build.status === 'succeeded' ? (
                `All ${build.progress?.atoms ?? result?.atoms.length ?? ''} atoms computed${build.finishedAt ? `, ${formatDateTime(build.finishedAt)}` : ''}.`
              ) : build.status === 'cancelled' ? (
                `Cancelled${build.progress ? ` after ${build.progress.atom} of ${build.progress.atoms} atoms` : ''}; nothing was stored.`
              ) : (
                'The build stopped with an error; nothing was stored.'
              )}
            </p>
            {build.status === 'failed' && build.error ? <Banner title="What went wrong">{build.error}</Banner> : null}
            {build.warnings.length > 0 ? <BuildWarnings warnings={build.warnings} title="Remarks on this build" /> : null}
          </div>
        </Card>
        <Card title="What is computed">
          <SpecFacts build={build} />
        </Card>
        {result ? <BuildResults build={build} result={result} /> : null}
      </div>
      <ConfirmDialog
        open={confirming}
        title={`Cancel “${title}”?`}
        confirmLabel="Cancel build"
        pending={cancel.isPending}
        error={cancel.error?.message ?? null}
        onClose={() => {
          setConfirming(false);
          cancel.reset();
        }}
        onConfirm={() => cancel.mutate(undefined, { onSuccess: () => setConfirming(false) })}
      >
        The atoms computed so far are thrown away and no library is stored. You can start the same build again from the Atom libraries tab.
      </ConfirmDialog>
    </>
  );
}

export default function ProjectLibraryBuildRoute() {
  const { project } = useProjectOutlet();
  const buildId = parseBuildId(useParams().buildId);
  if (buildId === null) {
    return (
      <Banner title="This project has no such library build">
        <p>The address does not name a build.</p>
      </Banner>
    );
  }
  const canDesign = projectRoleAllows(project.myRole, 'design') && !project.archived;
  return <BuildPage projectId={project.id} buildId={buildId} canDesign={canDesign} />;
}
