import type { QueryClient } from '@tanstack/react-query';
import { Link, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClasses } from '@/components/ui/button';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { revisionComparisonQueryOptions, useRevisionComparison } from '@/features/designs/api/compare-revisions';
import { RevisionComparison } from '@/features/designs/components/revision-comparison';
import { uploadsQueryOptions } from '@/features/designs/api/get-uploads';
import { parseProjectId, useProjectOutlet } from '@/app/routes/app/project/project-context';

function parseNumber(value: string | null): number | null {
  return value && /^[1-9][0-9]{0,8}$/.test(value) ? Number(value) : null;
}

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ params, request }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    const search = new URL(request.url).searchParams;
    const a = parseNumber(search.get('a'));
    const b = parseNumber(search.get('b'));
    // The upload names too: the changes name uploaded pictures by file name, and must not first show bare ids.
    if (projectId && a && b) await Promise.all([queryClient.prefetchQuery(revisionComparisonQueryOptions(projectId, a, b)), queryClient.prefetchQuery(uploadsQueryOptions(projectId))]);
    return null;
  };

export default function CompareRevisionsRoute() {
  const { project } = useProjectOutlet();
  const [search] = useSearchParams();
  const a = parseNumber(search.get('a'));
  const b = parseNumber(search.get('b'));
  const comparison = useRevisionComparison(project.id, a, b);

  const back = (
    <Link to={paths.projects.revisions.getHref(project.id)} className="text-sm font-bold text-teal underline-offset-4 hover:underline">
      ← All revisions
    </Link>
  );

  let body;
  if (a === null || b === null) {
    body = <Banner title="Choose two revisions">Tick two revisions in the list to compare them.</Banner>;
  } else if (comparison.isPending) {
    body = <PageLoader label={`Comparing revisions ${a} and ${b}`} />;
  } else if (comparison.isError) {
    body = (
      <Banner title="The comparison did not load">
        <p>{isApiError(comparison.error, 404) ? 'One of the two revisions does not exist in this project.' : comparison.error.message}</p>
        {isApiError(comparison.error, 404) ? null : (
          <Button variant="secondary" size="sm" className="mt-3" onClick={() => void comparison.refetch()}>
            Try again
          </Button>
        )}
      </Banner>
    );
  } else {
    body = <RevisionComparison projectId={project.id} a={comparison.data.a} b={comparison.data.b} changes={comparison.data.changes} />;
  }

  return (
    <div className="flex flex-col gap-5">
      <title>{`Revisions ${a ?? '?'} and ${b ?? '?'} · ${project.name} · Phasewright`}</title>
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          {back}
          <h2 className="mt-1 text-xl font-extrabold">
            {a !== null && b !== null ? `Revision ${a} beside revision ${b}` : 'Compare revisions'}
          </h2>
        </div>
        {a !== null && b !== null ? (
          <Link to={paths.projects.compareRevisions.getHref(project.id, b, a)} className={buttonClasses('secondary', 'sm')}>
            Swap sides
          </Link>
        ) : null}
      </div>
      {body}
    </div>
  );
}
