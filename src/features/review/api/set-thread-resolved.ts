import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ReviewThread } from '@shared/schemas/review';
import { api } from '@/lib/api-client';
import { reviewKeys } from '@/features/review/api/query-keys';

export function setThreadResolved(projectId: number, runId: number, threadId: number, resolved: boolean): Promise<{ thread: ReviewThread }> {
  return api.post<{ thread: ReviewThread }>(`/projects/${projectId}/runs/${runId}/threads/${threadId}/${resolved ? 'resolve' : 'reopen'}`);
}

export function useSetThreadResolved(projectId: number, runId: number, threadId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (resolved: boolean) => setThreadResolved(projectId, runId, threadId, resolved),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: reviewKeys.threads(projectId, runId) }),
  });
}
