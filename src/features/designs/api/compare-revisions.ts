import { queryOptions, useQuery } from '@tanstack/react-query';
import type { RevisionComparison } from '@shared/schemas/revisions';
import { api } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';

export function compareRevisions(projectId: number, a: number, b: number, signal?: AbortSignal): Promise<RevisionComparison> {
  return api.get<RevisionComparison>(`/projects/${projectId}/revisions/compare`, { params: { a, b }, signal });
}

export function revisionComparisonQueryOptions(projectId: number, a: number, b: number) {
  return queryOptions({
    queryKey: designKeys.comparison(projectId, a, b),
    queryFn: ({ signal }) => compareRevisions(projectId, a, b, signal),
    staleTime: 5 * 60_000,
  });
}

export function useRevisionComparison(projectId: number, a: number | null, b: number | null) {
  return useQuery({ ...revisionComparisonQueryOptions(projectId, a ?? 0, b ?? 0), enabled: a !== null && b !== null });
}
