import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ToleranceRequestInput, ToleranceStudy } from '@shared/schemas/tolerance';
import { api } from '@/lib/api-client';
import { runKeys } from '@/features/runs/api/query-keys';

export function startTolerance(projectId: number, runId: number, request: ToleranceRequestInput): Promise<{ study: ToleranceStudy }> {
  return api.post<{ study: ToleranceStudy }>(`/projects/${projectId}/runs/${runId}/tolerance`, request);
}

export function useStartTolerance(projectId: number, runId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (request: ToleranceRequestInput) => startTolerance(projectId, runId, request),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: runKeys.tolerance(projectId, runId), exact: true });
    },
  });
}
