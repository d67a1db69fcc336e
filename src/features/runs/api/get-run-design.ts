import { queryOptions, useQuery } from '@tanstack/react-query';
import { designSchema, type Design } from '@shared/schemas/design';
import { api } from '@/lib/api-client';
import { runKeys } from '@/features/runs/api/query-keys';

export const DESIGN_ARTIFACT = 'design.json';

/** The design a run used, from its stored design.json (channel names and kinds, atom library, extra input). */
export async function getRunDesign(projectId: number, runId: number, signal?: AbortSignal): Promise<Design | null> {
  const raw = await api.get<unknown>(`/projects/${projectId}/runs/${runId}/artifacts/${DESIGN_ARTIFACT}`, { signal });
  const parsed = designSchema.safeParse(raw);
  return parsed.success ? parsed.data : null;
}

export function runDesignQueryOptions(projectId: number, runId: number) {
  return queryOptions({
    queryKey: runKeys.artifact(projectId, runId, DESIGN_ARTIFACT),
    queryFn: ({ signal }) => getRunDesign(projectId, runId, signal),
    staleTime: Infinity,
  });
}

/** Loads the run's design once the run lists design.json among its files. */
export function useRunDesign(projectId: number, runId: number, available: boolean) {
  return useQuery({ ...runDesignQueryOptions(projectId, runId), enabled: available });
}
