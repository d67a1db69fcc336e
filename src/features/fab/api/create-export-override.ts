import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { RunDesignCheck } from '@shared/schemas/fab';
import { api } from '@/lib/api-client';
import { fabKeys } from '@/features/fab/api/query-keys';

export function createExportOverride(projectId: number, runId: number, reason: string) {
  return api.post<{ override: { id: number; reason: string; at: string }; check: RunDesignCheck }>(`/projects/${projectId}/runs/${runId}/export-override`, { reason });
}

export function useCreateExportOverride(projectId: number, runId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (reason: string) => createExportOverride(projectId, runId, reason),
    onSuccess: async ({ check }) => {
      queryClient.setQueryData(fabKeys.designCheck(projectId, runId), check);
      await queryClient.invalidateQueries({ queryKey: fabKeys.report(projectId, runId) });
    },
  });
}
