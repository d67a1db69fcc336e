import type { QueryClient } from '@tanstack/react-query';
import { Link, NavLink, Outlet, useParams, type LoaderFunctionArgs } from 'react-router-dom';
import { StatusPage } from '@/components/layouts/status-page';
import { Badge } from '@/components/ui/badge';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClasses } from '@/components/ui/button';
import { ArrowLeftIcon } from '@/components/ui/icons';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { isApiError } from '@/lib/api-client';
import { projectQueryOptions, useProject } from '@/features/projects/api/get-project';
import { ProjectRoleBadge } from '@/features/projects/components/project-role-badge';
import { parseProjectId, type ProjectOutletContext } from '@/app/routes/app/project/project-context';

export const clientLoader =
  (queryClient: QueryClient) =>
  async ({ params }: LoaderFunctionArgs) => {
    const projectId = parseProjectId(params.projectId);
    if (projectId) await queryClient.prefetchQuery(projectQueryOptions(projectId));
    return null;
  };

function ProjectMissing() {
  return (
    <StatusPage
      code="404"
      title="No such project here"
      actions={
        <Link to={paths.home.getHref()} className={buttonClasses('primary')}>
          Back to projects
        </Link>
      }
    >
      <title>Project not found · Phasewright</title>
      Either the project does not exist or you are not one of its members. If a colleague sent you this link, ask an
      owner of the project to add you.
    </StatusPage>
  );
}

const tabs = [
  { label: 'Overview', href: paths.projects.detail.getHref, end: true },
  { label: 'Design', href: paths.projects.design.getHref, end: true },
  { label: 'Revisions', href: paths.projects.revisions.getHref, end: false },
  { label: 'Runs', href: paths.projects.runs.getHref, end: false },
  { label: 'Atom libraries', href: paths.projects.atomLibraries.getHref, end: false },
  { label: 'Members', href: paths.projects.members.getHref, end: true },
] as const;

export default function ProjectLayoutRoute() {
  const projectId = parseProjectId(useParams().projectId);
  const project = useProject(projectId);

  if (!projectId) return <ProjectMissing />;
  if (project.isPending) return <PageLoader label="Opening project" />;
  if (project.isError) {
    if (isApiError(project.error, 404) || isApiError(project.error, 400)) return <ProjectMissing />;
    return (
      <Banner title="The project did not load">
        <p>{project.error.message}</p>
        <Button variant="secondary" size="sm" className="mt-3" onClick={() => void project.refetch()}>
          Try again
        </Button>
      </Banner>
    );
  }

  const data = project.data;
  return (
    <>
      <title>{`${data.name} · Phasewright`}</title>
      <Link
        to={paths.home.getHref()}
        className="mb-4 inline-flex items-center gap-1.5 rounded text-sm font-bold text-ink-soft hover:text-ink"
      >
        <ArrowLeftIcon className="size-4" />
        All projects
      </Link>
      <header className="mb-6">
        <div className="flex flex-wrap items-center gap-3">
          <h1 className="text-3xl font-extrabold tracking-tight break-words">{data.name}</h1>
          {data.archived ? <Badge tone="muted">Archived</Badge> : null}
          {data.myRole ? <ProjectRoleBadge role={data.myRole} /> : null}
        </div>
      </header>
      {data.archived ? (
        <Banner tone="warning" className="mb-6">
          This project is archived. It stays readable; an owner can bring it back to the active list from the
          overview.
        </Banner>
      ) : null}
      <nav aria-label="Project sections" className="mb-8 border-b border-line">
        <ul className="-mb-px flex gap-6">
          {tabs.map((tab) => (
            <li key={tab.label}>
              <NavLink
                to={tab.href(projectId)}
                end={tab.end}
                className={({ isActive }) =>
                  `inline-block rounded-t border-b-3 px-0.5 pb-2.5 font-bold transition-colors ${
                    isActive ? 'border-ember text-ink' : 'border-transparent text-ink-soft hover:border-line-strong hover:text-ink'
                  }`
                }
              >
                {tab.label}
              </NavLink>
            </li>
          ))}
        </ul>
      </nav>
      <Outlet context={{ project: data } satisfies ProjectOutletContext} />
    </>
  );
}
