import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { RunSummary } from '@shared/schemas/runs';
import { api } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';

export function startRun(projectId: number, revisionNumber: number): Promise<{ run: RunSummary }> {
  return api.post<{ run: RunSummary }>(`/projects/${projectId}/revisions/${revisionNumber}/runs`);
}

/** Queues a run of a saved revision; the revision list shows run counts, so it is refreshed. */
export function useStartRun(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (revisionNumber: number) => startRun(projectId, revisionNumber),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: designKeys.revisionList(projectId) });
    },
  });
}
