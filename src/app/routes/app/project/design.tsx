import type { QueryClient } from '@tanstack/react-query';
import { useMemo } from 'react';
import { Link, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClasses } from '@/components/ui/button';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { revisionQueryOptions, useRevision } from '@/features/designs/api/get-revision';
import { revisionsQueryOptions, useRevisions } from '@/features/designs/api/get-revisions';
import { useCurrentUser } from '@/features/auth/api/get-me';
import { DesignComposer } from '@/features/designs/components/design-composer';
import { useLibraryFromAddress } from '@/features/designs/hooks/use-library-from-address';
import { useStartRun } from '@/features/runs/api/start-run';
import { designSourceKey } from '@/features/designs/stores/design-editor-store';
import { designTemplate, type DesignDraft } from '@/features/designs/utils/design-draft';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

function parseRevisionNumber(value: string | null): number | null {
  return value && /^[1-9][0-9]{0,8}$/.test(value) ? Number(value) : null;
}

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ params, request }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    if (!projectId) return null;
    const from = parseRevisionNumber(new URL(request.url).searchParams.get('from'));
    if (from) {
      await queryClient.prefetchQuery(revisionQueryOptions(projectId, from));
      return null;
    }
    const list = await queryClient.ensureQueryData(revisionsQueryOptions(projectId)).catch(() => null);
    const latest = list?.revisions[0]?.number;
    if (latest) await queryClient.prefetchQuery(revisionQueryOptions(projectId, latest));
    return null;
  };

export default function ProjectDesignRoute() {
  const { project } = useProjectOutlet();
  const user = useCurrentUser();
  const [search] = useSearchParams();
  const from = parseRevisionNumber(search.get('from'));
  const revisions = useRevisions(project.id);
  const latest = revisions.data?.[0]?.number ?? null;
  const number = from ?? latest;
  const revision = useRevision(project.id, number);
  const template = useMemo(() => designTemplate(project.name), [project.name]);
  useLibraryFromAddress(project.id, designSourceKey(user.id, project.id, number));
  const startRun = useStartRun(project.id);
  const runStarter = useMemo(
    () => ({ mutateAsync: (revisionNumber: number) => startRun.mutateAsync({ revisionNumber }), isPending: startRun.isPending }),
    [startRun],
  );

  if (from === null && revisions.isPending) return <PageLoader label="Finding the latest revision" />;
  if (from === null && revisions.isError) {
    return (
      <Banner title="The revisions did not load">
        <p>{revisions.error.message}</p>
        <Button variant="secondary" size="sm" className="mt-3" onClick={() => void revisions.refetch()}>
          Try again
        </Button>
      </Banner>
    );
  }
  if (number !== null && revision.isPending) return <PageLoader label={`Opening revision ${number}`} />;
  if (number !== null && revision.isError) {
    const missing = isApiError(revision.error, 404);
    return (
      <Banner title={missing ? `There is no revision ${number} in this project` : `Revision ${number} did not load`}>
        <p>{missing ? 'It may have been mistyped in the address.' : revision.error.message}</p>
        <div className="mt-3 flex gap-2">
          <Link to={paths.projects.revisions.getHref(project.id)} className={buttonClasses('secondary', 'sm')}>
            See all revisions
          </Link>
          {missing ? null : (
            <Button variant="secondary" size="sm" onClick={() => void revision.refetch()}>
              Try again
            </Button>
          )}
        </div>
      </Banner>
    );
  }

  const base = number !== null ? (revision.data ?? null) : null;
  return (
    <DesignComposer
      project={project}
      sourceKey={designSourceKey(user.id, project.id, number)}
      initialDraft={base ? (base.design as DesignDraft) : template}
      baseRevision={base}
      runStarter={runStarter}
    />
  );
}
