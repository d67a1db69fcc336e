import { queryOptions, useQuery } from '@tanstack/react-query';
import type { RunComparison } from '@shared/schemas/run-comparison';
import { env } from '@/config/env';
import { api } from '@/lib/api-client';
import { runKeys } from '@/features/runs/api/query-keys';

export function getRunComparison(projectId: number, a: number, b: number, signal?: AbortSignal): Promise<{ comparison: RunComparison }> {
  return api.get<{ comparison: RunComparison }>(`/projects/${projectId}/runs/compare`, { params: { a, b }, signal });
}

export function runComparisonQueryOptions(projectId: number, a: number, b: number) {
  return queryOptions({
    queryKey: runKeys.comparison(projectId, a, b),
    queryFn: ({ signal }) => getRunComparison(projectId, a, b, signal),
    staleTime: 60_000,
  });
}

export function useRunComparison(projectId: number, a: number | null, b: number | null) {
  return useQuery({ ...runComparisonQueryOptions(projectId, a ?? 0, b ?? 0), enabled: a !== null && b !== null && a !== b });
}

/** Address of one far-field picture of the comparison: input `channel`, run a, run b or the difference b − a. */
export function comparisonPictureHref(projectId: number, a: number, b: number, channel: 'a' | 'b', show: 'a' | 'b' | 'difference'): string {
  return `${env.API_URL}/projects/${projectId}/runs/compare/far-field.png?a=${a}&b=${b}&channel=${channel}&show=${show}`;
}
