import { Link } from 'react-router-dom';
import type { Project, ListProjectsQuery } from '@shared/schemas/projects';
import { Badge } from '@/components/ui/badge';
import { SortHeader } from '@/components/ui/sort-header';
import { paths } from '@/config/paths';
import { formatDate, formatRelative } from '@/lib/format';
import type { ProjectListFilters } from '@/features/projects/api/query-keys';
import { ProjectRoleBadge } from '@/features/projects/components/project-role-badge';

type SortKey = ListProjectsQuery['sort'];

interface ProjectsTableProps {
  projects: Project[];
  filters: ProjectListFilters;
  onSort: (sort: SortKey) => void;
  stale?: boolean;
}

export function ProjectsTable({ projects, filters, onSort, stale = false }: ProjectsTableProps) {
  return (
    <div className={`relative overflow-x-auto rounded-card bg-card shadow-card ring-1 ring-line/70 transition-opacity ${stale ? 'opacity-60' : ''}`}>
      <table className="w-full min-w-[44rem] text-sm" aria-busy={stale || undefined}>
        <caption className="sr-only">Projects</caption>
        <thead className="border-b border-line text-ink-soft">
          <tr>
            <SortHeader label="Project" sortKey="name" sort={filters} onSort={onSort} />
            <th scope="col" className="px-4 py-3 text-left font-bold">
              Your role
            </th>
            <SortHeader label="Members" sortKey="memberCount" sort={filters} onSort={onSort} align="right" />
            <SortHeader label="Last change" sortKey="updatedAt" sort={filters} onSort={onSort} />
            <SortHeader label="Started" sortKey="createdAt" sort={filters} onSort={onSort} />
          </tr>
        </thead>
        <tbody className="divide-y divide-line/70">
          {projects.map((project) => (
            <tr key={project.id} className="align-top hover:bg-paper/60">
              <td className="max-w-md px-4 py-3.5">
                <div className="flex flex-wrap items-center gap-2">
                  <Link
                    to={paths.projects.detail.getHref(project.id)}
                    className="rounded font-extrabold text-ink decoration-ember decoration-2 underline-offset-4 hover:underline"
                  >
                    {project.name}
                  </Link>
                  {project.archived ? <Badge tone="muted">Archived</Badge> : null}
                </div>
                {project.description ? <p className="mt-0.5 line-clamp-2 text-ink-soft">{project.description}</p> : null}
              </td>
              <td className="px-4 py-3.5">{project.myRole ? <ProjectRoleBadge role={project.myRole} /> : '—'}</td>
              <td className="px-4 py-3.5 text-right tabular-nums">{project.memberCount}</td>
              <td className="px-4 py-3.5 whitespace-nowrap text-ink-soft">
                <time dateTime={project.updatedAt} title={formatDate(project.updatedAt)}>
                  {formatRelative(project.updatedAt)}
                </time>
              </td>
              <td className="px-4 py-3.5 whitespace-nowrap text-ink-soft">
                <time dateTime={project.createdAt}>{formatDate(project.createdAt)}</time>
                {project.createdBy ? <span className="block text-xs">by {project.createdBy.name}</span> : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
