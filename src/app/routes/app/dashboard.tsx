import type { QueryClient } from '@tanstack/react-query';
import { useEffect, useState, type ReactNode } from 'react';
import { useNavigate, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import type { ListProjectsQuery } from '@shared/schemas/projects';
import { PageHeader } from '@/components/layouts/page-header';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { EmptyState } from '@/components/ui/empty-state';
import { PageLoader } from '@/components/ui/spinner';
import { paths } from '@/config/paths';
import { useDebouncedValue } from '@/hooks/use-debounced-value';
import {
  defaultProjectFilters,
  projectFiltersFromSearch,
  projectsQueryOptions,
  useProjects,
} from '@/features/projects/api/get-projects';
import type { ProjectListFilters } from '@/features/projects/api/query-keys';
import { CreateProjectButton } from '@/features/projects/components/create-project-dialog';
import { ProjectListControls } from '@/features/projects/components/project-list-controls';
import { ProjectsTable } from '@/features/projects/components/projects-table';

export const clientLoader =
  (queryClient: QueryClient) =>
  ({ request }: LoaderFunctionArgs) => {
    void queryClient.prefetchQuery(projectsQueryOptions(projectFiltersFromSearch(new URL(request.url).searchParams)));
    return null;
  };

const firstDirection: Record<ListProjectsQuery['sort'], 'asc' | 'desc'> = {
  name: 'asc',
  memberCount: 'desc',
  updatedAt: 'desc',
  createdAt: 'desc',
};

function toSearch(filters: ProjectListFilters): URLSearchParams {
  const search = new URLSearchParams();
  for (const key of ['q', 'status', 'sort', 'dir'] as const) {
    if (filters[key] !== defaultProjectFilters[key]) search.set(key, filters[key]);
  }
  return search;
}

export default function DashboardRoute() {
  const navigate = useNavigate();
  const [searchParams, setSearchParams] = useSearchParams();
  const filters = projectFiltersFromSearch(searchParams);
  const [text, setText] = useState(filters.q);
  const debouncedText = useDebouncedValue(text.trim(), 250);
  const projects = useProjects(filters);

  const applyFilters = (next: Partial<ProjectListFilters>) =>
    setSearchParams(toSearch({ ...filters, ...next }), { replace: true });

  useEffect(() => {
    if (debouncedText !== filters.q) applyFilters({ q: debouncedText });
  }, [debouncedText]);

  const openProject = (projectId: number) => navigate(paths.projects.detail.getHref(projectId));
  const newProjectButton = <CreateProjectButton onCreated={(project) => openProject(project.id)} />;

  const sortBy = (sort: ListProjectsQuery['sort']) =>
    applyFilters({ sort, dir: filters.sort === sort ? (filters.dir === 'asc' ? 'desc' : 'asc') : firstDirection[sort] });

  return (
    <>
      <title>Projects · Phasewright</title>
      <PageHeader
        title="Projects"
        description="Each project gathers the designs, runs and reviews for one device, shared with the people you add."
        actions={newProjectButton}
      />
      <ProjectListControls
        text={text}
        onTextChange={setText}
        status={filters.status}
        onStatusChange={(status) => applyFilters({ status })}
      />
      <ProjectList
        filters={filters}
        query={projects}
        onClearText={() => {
          setText('');
          applyFilters({ q: '' });
        }}
        onSort={sortBy}
        newProjectButton={<CreateProjectButton label="Create your first project" onCreated={(project) => openProject(project.id)} />}
      />
    </>
  );
}

interface ProjectListProps {
  filters: ProjectListFilters;
  query: ReturnType<typeof useProjects>;
  onClearText: () => void;
  onSort: (sort: ListProjectsQuery['sort']) => void;
  newProjectButton: ReactNode;
}

function ProjectList({ filters, query, onClearText, onSort, newProjectButton }: ProjectListProps) {
  if (query.isPending) return <PageLoader label="Loading projects" />;
  if (query.isError) {
    return (
      <Banner title="The project list did not load">
        <p>{query.error.message}</p>
        <Button variant="secondary" size="sm" className="mt-3" onClick={() => void query.refetch()}>
          Try again
        </Button>
      </Banner>
    );
  }

  const { projects } = query.data;
  if (projects.length > 0) {
    return (
      <>
        <p className="sr-only" role="status">
          {projects.length} {projects.length === 1 ? 'project' : 'projects'} shown
        </p>
        <ProjectsTable projects={projects} filters={filters} onSort={onSort} stale={query.isPlaceholderData} />
      </>
    );
  }
  if (filters.q) {
    return (
      <EmptyState
        title={`No project matches “${filters.q}”`}
        action={
          <Button variant="secondary" onClick={onClearText}>
            Clear the filter
          </Button>
        }
      >
        The filter looks at names and descriptions{filters.status === 'all' ? '' : ` of ${filters.status} projects`}. Try
        a shorter word, or clear it to see the whole list.
      </EmptyState>
    );
  }
  if (filters.status === 'archived') {
    return (
      <EmptyState title="Nothing archived">
        When a project is finished or on hold, its owner can archive it from the project page. It then waits here.
      </EmptyState>
    );
  }
  return (
    <EmptyState title="No active projects yet" action={newProjectButton}>
      Create a project, then add the people you work with from its Members tab. Anything archived is under Show →
      Archived.
    </EmptyState>
  );
}
