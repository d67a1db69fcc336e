import type { QueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { Link, useNavigate, type LoaderFunctionArgs } from 'react-router-dom';
import { projectRoleAllows } from '@shared/roles';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClasses } from '@/components/ui/button';
import { EmptyState } from '@/components/ui/empty-state';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { revisionsQueryOptions, useRevisions } from '@/features/designs/api/get-revisions';
import { useStartRun } from '@/features/runs/api/start-run';
import { RevisionsTable } from '@/features/designs/components/revisions-table';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    if (projectId) await queryClient.prefetchQuery(revisionsQueryOptions(projectId));
    return null;
  };

export default function ProjectRevisionsRoute() {
  const { project } = useProjectOutlet();
  const navigate = useNavigate();
  const revisions = useRevisions(project.id);
  const startRun = useStartRun(project.id);
  const [selected, setSelected] = useState<number[]>([]);
  const [runError, setRunError] = useState<string | null>(null);
  const canDesign = projectRoleAllows(project.myRole, 'design');

  function toggle(number: number) {
    setSelected((current) => (current.includes(number) ? current.filter((n) => n !== number) : [...current, number].slice(-2)));
  }

  async function run(number: number) {
    setRunError(null);
    try {
      const { run: started } = await startRun.mutateAsync({ revisionNumber: number });
      navigate(paths.projects.run.getHref(project.id, started.id));
    } catch (error) {
      setRunError(`Revision ${number} did not start: ${isApiError(error) ? error.message : 'try again'}.`);
    }
  }

  const [older, newer] = [...selected].sort((a, b) => a - b);

  return (
    <div className="flex flex-col gap-5">
      <title>{`Revisions of ${project.name} · Phasewright`}</title>
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 className="text-xl font-extrabold">Revisions</h2>
          <p className="text-sm text-ink-soft">Every save keeps the whole design as it was. Tick two revisions to compare them.</p>
        </div>
        <div className="flex flex-wrap items-center gap-2">
          <span className="text-sm text-ink-soft" aria-live="polite">
            {selected.length === 0 ? 'None ticked' : selected.length === 1 ? `Revision ${selected[0]} ticked — tick one more` : `Revisions ${older} and ${newer} ticked`}
          </span>
          {selected.length === 2 ? (
            <Link to={paths.projects.compareRevisions.getHref(project.id, older, newer)} className={buttonClasses('primary')}>
              Compare ticked revisions
            </Link>
          ) : (
            <Button disabled>Compare ticked revisions</Button>
          )}
        </div>
      </div>
      {runError ? <Banner>{runError}</Banner> : null}
      {revisions.isPending ? (
        <PageLoader label="Loading revisions" />
      ) : revisions.isError ? (
        <Banner title="The revisions did not load">
          <p>{revisions.error.message}</p>
          <Button variant="secondary" size="sm" className="mt-3" onClick={() => void revisions.refetch()}>
            Try again
          </Button>
        </Banner>
      ) : revisions.data.length === 0 ? (
        <EmptyState
          title="No saved revisions yet"
          action={
            <Link to={paths.projects.design.getHref(project.id)} className={buttonClasses('primary')}>
              {canDesign ? 'Compose the first design' : 'Open the composer'}
            </Link>
          }
        >
          {canDesign
            ? 'Compose the design — setup, polarization pair and a recipe per channel — and save it; each save lands here.'
            : 'When an owner or designer saves the design, its revisions are listed here.'}
        </EmptyState>
      ) : (
        <RevisionsTable
          projectId={project.id}
          revisions={revisions.data}
          selected={selected}
          onToggle={toggle}
          canRun={canDesign}
          runningNumber={startRun.isPending ? (startRun.variables?.revisionNumber ?? null) : null}
          onRun={(number) => void run(number)}
        />
      )}
    </div>
  );
}
