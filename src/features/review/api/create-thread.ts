import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CreateThreadInput, ReviewThread } from '@shared/schemas/review';
import { api } from '@/lib/api-client';
import { reviewKeys } from '@/features/review/api/query-keys';

export function createThread(projectId: number, runId: number, input: CreateThreadInput): Promise<{ thread: ReviewThread }> {
  return api.post<{ thread: ReviewThread }>(`/projects/${projectId}/runs/${runId}/threads`, input);
}

export function useCreateThread(projectId: number, runId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateThreadInput) => createThread(projectId, runId, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: reviewKeys.threads(projectId, runId) }),
  });
}
