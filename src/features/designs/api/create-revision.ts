import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Design } from '@shared/schemas/design';
import type { Revision } from '@shared/schemas/revisions';
import { api } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';

export interface CreateRevisionVariables {
  design: Design;
  message: string;
}

export function createRevision(projectId: number, input: CreateRevisionVariables): Promise<{ revision: Revision }> {
  return api.post<{ revision: Revision }>(`/projects/${projectId}/revisions`, input);
}

export function useCreateRevision(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateRevisionVariables) => createRevision(projectId, input),
    onSuccess: async (data) => {
      queryClient.setQueryData(designKeys.revision(projectId, data.revision.number), data);
      await queryClient.invalidateQueries({ queryKey: designKeys.revisionList(projectId) });
    },
  });
}
