import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '@/lib/api-client';
import { reviewKeys } from '@/features/review/api/query-keys';

export function deleteComment(projectId: number, runId: number, threadId: number, commentId: number): Promise<void> {
  return api.delete(`/projects/${projectId}/runs/${runId}/threads/${threadId}/comments/${commentId}`);
}

export function useDeleteComment(projectId: number, runId: number, threadId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (commentId: number) => deleteComment(projectId, runId, threadId, commentId),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: reviewKeys.threads(projectId, runId) }),
  });
}
