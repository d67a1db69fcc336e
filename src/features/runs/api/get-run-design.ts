import { queryOptions, useQuery } from '@tanstack/react-query';
import { designSchema, type Design } from '@shared/schemas/design';
import { ApiError } from '@/lib/api-client';
import { useArtifactAddress } from '@/features/runs/api/artifact-url-context';
import { runKeys } from '@/features/runs/api/query-keys';

export const DESIGN_ARTIFACT = 'design.json';

/** The design a run used, from its stored design.json (channel names and kinds, atom library, extra input). */
export async function getRunDesign(href: string, signal?: AbortSignal): Promise<Design | null> {
  const response = await fetch(href, { headers: { Accept: 'application/json' }, credentials: 'same-origin', signal });
  if (!response.ok) throw new ApiError(response.status, `The run's ${DESIGN_ARTIFACT} did not load (the server answered ${response.status})`);
  const parsed = designSchema.safeParse(await response.json().catch(() => null));
  return parsed.success ? parsed.data : null;
}

export function runDesignQueryOptions(projectId: number, runId: number, href: string) {
  return queryOptions({
    queryKey: [...runKeys.artifact(projectId, runId, DESIGN_ARTIFACT), href] as const,
    queryFn: ({ signal }) => getRunDesign(href, signal),
    staleTime: Infinity,
  });
}

/** Loads the run's design once the run lists design.json among its files. */
export function useRunDesign(projectId: number, runId: number, available: boolean) {
  const href = useArtifactAddress(projectId, runId).href(DESIGN_ARTIFACT);
  return useQuery({ ...runDesignQueryOptions(projectId, runId, href), enabled: available });
}
