import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ReviewComment } from '@shared/schemas/review';
import { api } from '@/lib/api-client';
import { reviewKeys } from '@/features/review/api/query-keys';

export function editComment(projectId: number, runId: number, threadId: number, commentId: number, body: string): Promise<{ comment: ReviewComment }> {
  return api.patch<{ comment: ReviewComment }>(`/projects/${projectId}/runs/${runId}/threads/${threadId}/comments/${commentId}`, { body });
}

export function useEditComment(projectId: number, runId: number, threadId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ commentId, body }: { commentId: number; body: string }) => editComment(projectId, runId, threadId, commentId, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: reviewKeys.threads(projectId, runId) }),
  });
}
