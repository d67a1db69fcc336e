import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { RunDetail } from '@shared/schemas/runs';
import { api } from '@/lib/api-client';
import { runKeys } from '@/features/runs/api/query-keys';

export function deleteRunFiles(projectId: number, runId: number): Promise<{ run: RunDetail }> {
  return api.delete<{ run: RunDetail }>(`/projects/${projectId}/runs/${runId}/files`);
}

/** Deletes a finished run's stored files; the run, its metrics and events stay. */
export function useDeleteRunFiles(projectId: number, runId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => deleteRunFiles(projectId, runId),
    onSuccess: async () => {
      queryClient.removeQueries({ queryKey: runKeys.artifacts(projectId, runId) });
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: runKeys.detail(projectId, runId), exact: true }),
        queryClient.invalidateQueries({ queryKey: runKeys.lists(projectId) }),
      ]);
    },
  });
}
