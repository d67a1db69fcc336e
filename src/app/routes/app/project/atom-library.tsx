import type { QueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { Link, useNavigate, useParams, type LoaderFunctionArgs } from 'react-router-dom';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClasses } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { ConfirmDialog } from '@/components/ui/confirm-dialog';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { formatDate } from '@/lib/format';
import { useDeleteAtomLibrary } from '@/features/atom-libraries/api/delete-atom-library';
import { useShareAtomLibrary } from '@/features/atom-libraries/api/share-atom-library';
import { atomLibraryCsvHref, atomLibraryQueryOptions, parseLibraryId, useAtomLibrary } from '@/features/atom-libraries/api/get-atom-library';
import { AtomLibraryBadges } from '@/features/atom-libraries/components/atom-library-badges';
import { PhaseCoverageChart, RetardanceHistogram } from '@/features/atom-libraries/components/atom-library-charts';
import { AtomTable } from '@/features/atom-libraries/components/atom-table';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

export const clientLoader =
  (queryClient: QueryClient) =>
  ({ params }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    const libraryId = parseLibraryId(params.libraryId);
    if (projectId && libraryId) void queryClient.prefetchQuery(atomLibraryQueryOptions(projectId, libraryId));
    return null;
  };

function LibraryPage({ projectId, libraryId }: { projectId: number; libraryId: number | 'demo' }) {
  const navigate = useNavigate();
  const library = useAtomLibrary(projectId, libraryId);
  const remove = useDeleteAtomLibrary(projectId);
  const share = useShareAtomLibrary(projectId);
  const [confirming, setConfirming] = useState(false);
  const back = (
    <Link to={paths.projects.atomLibraries.getHref(projectId)} className={buttonClasses('secondary', 'sm')}>
      All atom libraries
    </Link>
  );

  if (library.isPending) return <PageLoader label="Opening the atom library" />;
  if (library.isError) {
    const missing = isApiError(library.error, 404) || isApiError(library.error, 400);
    return (
      <Banner title={missing ? 'This project has no such atom library' : 'The atom library did not load'}>
        <p>{missing ? 'It may have been deleted, or the address is mistyped.' : library.error.message}</p>
        <div className="mt-3">{back}</div>
      </Banner>
    );
  }
  const data = library.data;
  const isDemo = data.id === 'demo';
  const canDelete = data.canDelete && typeof data.id === 'number';
  return (
    <>
      <title>{`${data.name} · Phasewright`}</title>
      <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
        <div className="min-w-0">
          <h2 className="text-xl font-extrabold break-words">{data.name}</h2>
          <div className="mt-2">
            <AtomLibraryBadges library={data} />
          </div>
        </div>
        <div className="flex flex-wrap gap-2">
          {back}
          <a href={atomLibraryCsvHref(projectId, data.id)} className={buttonClasses('secondary', 'sm')} download>
            Download CSV
          </a>
          {data.canShare && typeof data.id === 'number' ? (
            <Button
              variant="secondary"
              size="sm"
              pending={share.isPending}
              onClick={() => share.mutate({ libraryId: data.id as number, shared: !data.sharedHere })}
            >
              {data.sharedHere ? 'Stop sharing with this project' : 'Share with this project'}
            </Button>
          ) : null}
          {canDelete ? (
            <Button variant="danger" size="sm" onClick={() => setConfirming(true)}>
              Delete library
            </Button>
          ) : null}
        </div>
      </div>
      {share.error ? (
        <Banner tone="error" title="Sharing did not change" className="mb-6">
          {share.error.message}
        </Banner>
      ) : null}
      {data.canShare && !data.sharedHere ? (
        <Banner tone="info" title="Only you see this personal library" className="mb-6">
          Other members of this project do not see it until you share it with the project; you can stop sharing at any time.
        </Banner>
      ) : null}
      {data.approximate ? (
        <Banner tone="warning" title="Approximate library" className="mb-6">
          {isDemo
            ? 'The demo library comes from a simple waveguide model, not from full-wave simulation; a run makes it afresh for each design’s wavelength and period (shown here at 633 nm and 450 nm). Treat efficiencies from it as approximate and use your lab’s own library before fabrication.'
            : 'This library does not say that its numbers come from full-wave simulation or measurement (no "# approximate: false" line). Treat efficiencies from it as approximate.'}
        </Banner>
      ) : null}
      <div className="flex flex-col gap-6">
        <Card title="Facts">
          <dl className="grid gap-x-6 gap-y-2 text-sm sm:grid-cols-[auto_minmax(0,1fr)]">
            <dt className="font-bold text-ink-soft">Design wavelength λ</dt>
            <dd>{isDemo ? `any (shown: ${data.wavelengthNm} nm)` : `${data.wavelengthNm} nm`}</dd>
            <dt className="font-bold text-ink-soft">Period P</dt>
            <dd>{isDemo ? `any (shown: ${data.periodNm} nm)` : `${data.periodNm} nm`}</dd>
            <dt className="font-bold text-ink-soft">Pillar height</dt>
            <dd>{data.heightNm} nm</dd>
            <dt className="font-bold text-ink-soft">Atoms</dt>
            <dd>{data.atomCount}</dd>
            <dt className="font-bold text-ink-soft">Material</dt>
            <dd>{data.material || '—'}</dd>
            {data.source ? (
              <>
                <dt className="font-bold text-ink-soft">Source</dt>
                <dd className="text-ink-soft">{data.source}</dd>
              </>
            ) : null}
            {data.owner ? (
              <>
                <dt className="font-bold text-ink-soft">Uploaded by</dt>
                <dd>
                  {data.owner.name}
                  {data.createdAt ? `, ${formatDate(data.createdAt)}` : ''}
                </dd>
              </>
            ) : null}
            {!isDemo ? (
              <>
                <dt className="font-bold text-ink-soft">Used by</dt>
                <dd>{data.usedBy.length ? `revision${data.usedBy.length === 1 ? '' : 's'} ${data.usedBy.join(', ')}` : 'no revision of this project'}</dd>
              </>
            ) : null}
          </dl>
        </Card>
        <div className="grid gap-6 lg:grid-cols-2">
          <Card title="Phase coverage" description="α_x against α_y of every atom. A usable library fills the square without wide gaps.">
            <PhaseCoverageChart atoms={data.atoms} />
          </Card>
          <Card title="Retardance spread" description="How many atoms give each phase difference α_x − α_y, wrapped to (−π, π].">
            <RetardanceHistogram atoms={data.atoms} />
          </Card>
        </div>
        <Card title="Atoms">
          <AtomTable atoms={data.atoms} />
        </Card>
      </div>
      {canDelete ? (
        <ConfirmDialog
          open={confirming}
          title={`Delete “${data.name}”?`}
          confirmLabel="Delete library"
          pending={remove.isPending}
          error={remove.error?.message ?? null}
          onClose={() => {
            setConfirming(false);
            remove.reset();
          }}
          onConfirm={() =>
            remove.mutate(data.id as number, { onSuccess: () => navigate(paths.projects.atomLibraries.getHref(projectId)) })
          }
        >
          The library is removed for everyone who can see it. A library that saved revisions use cannot be deleted.
        </ConfirmDialog>
      ) : null}
    </>
  );
}

export default function ProjectAtomLibraryRoute() {
  const { project } = useProjectOutlet();
  const libraryId = parseLibraryId(useParams().libraryId);
  if (libraryId === null) {
    return (
      <Banner title="This project has no such atom library">
        <p>The address does not name a library.</p>
      </Banner>
    );
  }
  return <LibraryPage projectId={project.id} libraryId={libraryId} />;
}
