import { useNavigate } from 'react-router-dom';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { paths } from '@/config/paths';
import { useLibraryBuilds } from '@/features/library-builds/api/library-builds';
import { ComputeLibraryForm } from '@/features/library-builds/components/compute-library-form';
import { LibraryBuildsTable } from '@/features/library-builds/components/library-builds-table';

const REFERENCES = [
  'M. G. Moharam & T. K. Gaylord, J. Opt. Soc. Am. 71, 811 (1981): rigorous coupled-wave analysis',
  'L. Li, J. Opt. Soc. Am. A 14, 2758 (1997): Fourier factorization of crossed gratings',
];

/** The Atom libraries tab's builds: the project's list, and the form that starts one (designers). */
export function LibraryBuildsSection({ projectId, canStart }: { projectId: number; canStart: boolean }) {
  const navigate = useNavigate();
  const builds = useLibraryBuilds(projectId);
  const buildHref = (buildId: number) => paths.projects.libraryBuild.getHref(projectId, buildId);
  return (
    <>
      <section aria-labelledby="library-builds-title" className="flex flex-col gap-3">
        <h3 id="library-builds-title" className="text-lg font-extrabold">
          Library builds
        </h3>
        {builds.isPending ? (
          <p className="text-sm text-ink-soft">Loading the builds…</p>
        ) : builds.isError ? (
          <Banner title="The library builds did not load">
            <p>{builds.error.message}</p>
            <Button variant="secondary" size="sm" className="mt-3" onClick={() => void builds.refetch()}>
              Try again
            </Button>
          </Banner>
        ) : builds.data.length === 0 ? (
          <p className="text-sm text-ink-soft">No library has been computed in this project yet.</p>
        ) : (
          <LibraryBuildsTable builds={builds.data} buildHref={buildHref} />
        )}
      </section>
      {canStart ? (
        <Card
          title="Compute a library"
          description="Rectangular pillars of one height in a square lattice, swept over widths w and lengths l and computed by rigorous coupled-wave analysis on the run workers. The result is stored as an atom library (not approximate) that designs can use."
          references={REFERENCES}
        >
          <ComputeLibraryForm projectId={projectId} onStarted={(build) => navigate(buildHref(build.id))} />
        </Card>
      ) : null}
    </>
  );
}
