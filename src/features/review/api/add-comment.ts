import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ReviewComment } from '@shared/schemas/review';
import { api } from '@/lib/api-client';
import { reviewKeys } from '@/features/review/api/query-keys';

export function addComment(projectId: number, runId: number, threadId: number, body: string): Promise<{ comment: ReviewComment }> {
  return api.post<{ comment: ReviewComment }>(`/projects/${projectId}/runs/${runId}/threads/${threadId}/comments`, { body });
}

export function useAddComment(projectId: number, runId: number, threadId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: string) => addComment(projectId, runId, threadId, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: reviewKeys.threads(projectId, runId) }),
  });
}
