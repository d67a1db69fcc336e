import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { PROJECT_SORT_KEYS, type Project } from '@shared/schemas/projects';
import { api } from '@/lib/api-client';
import { projectKeys, type ProjectListFilters } from '@/features/projects/api/query-keys';

const STATUSES = ['active', 'archived', 'all'] as const;
const DIRECTIONS = ['asc', 'desc'] as const;

export const defaultProjectFilters: ProjectListFilters = { q: '', status: 'active', sort: 'updatedAt', dir: 'desc' };

function pick<T extends string>(value: string | null, allowed: readonly T[], fallback: T): T {
  return value !== null && (allowed as readonly string[]).includes(value) ? (value as T) : fallback;
}

/** Reads list filters from the address bar so a filtered list can be bookmarked and shared. */
export function projectFiltersFromSearch(search: URLSearchParams): ProjectListFilters {
  return {
    q: (search.get('q') ?? '').trim().slice(0, 120),
    status: pick(search.get('status'), STATUSES, defaultProjectFilters.status),
    sort: pick(search.get('sort'), PROJECT_SORT_KEYS, defaultProjectFilters.sort),
    dir: pick(search.get('dir'), DIRECTIONS, defaultProjectFilters.dir),
  };
}

export function getProjects(filters: ProjectListFilters, signal?: AbortSignal): Promise<{ projects: Project[] }> {
  return api.get<{ projects: Project[] }>('/projects', { params: filters, signal });
}

export function projectsQueryOptions(filters: ProjectListFilters) {
  return queryOptions({
    queryKey: projectKeys.list(filters),
    queryFn: ({ signal }) => getProjects(filters, signal),
    placeholderData: keepPreviousData,
  });
}

export function useProjects(filters: ProjectListFilters) {
  return useQuery(projectsQueryOptions(filters));
}
