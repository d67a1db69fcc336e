import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { RunDetail } from '@shared/schemas/runs';
import { api } from '@/lib/api-client';
import { runKeys } from '@/features/runs/api/query-keys';

export function startRun(projectId: number, revisionNumber: number): Promise<{ run: RunDetail }> {
  return api.post<{ run: RunDetail }>(`/projects/${projectId}/revisions/${revisionNumber}/runs`);
}

/** Queues a run of a saved revision; the new run's page can open straight from the answer. */
export function useStartRun(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationKey: runKeys.start(projectId),
    mutationFn: ({ revisionNumber }: { revisionNumber: number }) => startRun(projectId, revisionNumber),
    onSuccess: async (data) => {
      queryClient.setQueryData(runKeys.detail(projectId, data.run.id), data);
      await queryClient.invalidateQueries({ queryKey: runKeys.lists(projectId) });
    },
  });
}
