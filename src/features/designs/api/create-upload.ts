import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Upload, UploadKind } from '@shared/schemas/uploads';
import { api } from '@/lib/api-client';
import { designKeys } from '@/features/designs/api/query-keys';

export interface CreateUploadVariables {
  file: File;
  kind: UploadKind;
}

export function createUpload(projectId: number, { file, kind }: CreateUploadVariables): Promise<{ upload: Upload }> {
  const form = new FormData();
  form.append('kind', kind);
  form.append('file', file);
  return api.postForm<{ upload: Upload }>(`/projects/${projectId}/uploads`, form);
}

export function useCreateUpload(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateUploadVariables) => createUpload(projectId, input),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: designKeys.uploads(projectId) });
    },
  });
}
