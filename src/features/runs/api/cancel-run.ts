import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { RunDetail } from '@shared/schemas/runs';
import { api } from '@/lib/api-client';
import { runKeys } from '@/features/runs/api/query-keys';

export function cancelRun(projectId: number, runId: number): Promise<{ run: RunDetail }> {
  return api.post<{ run: RunDetail }>(`/projects/${projectId}/runs/${runId}/cancel`);
}

export function useCancelRun(projectId: number, runId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => cancelRun(projectId, runId),
    onSuccess: async () => {
      await Promise.all([
        queryClient.invalidateQueries({ queryKey: runKeys.detail(projectId, runId), exact: true }),
        queryClient.invalidateQueries({ queryKey: runKeys.lists(projectId) }),
      ]);
    },
  });
}
