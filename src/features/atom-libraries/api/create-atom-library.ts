import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { AtomLibraryDetail, AtomLibraryScope } from '@shared/schemas/atom-libraries';
import { api } from '@/lib/api-client';
import { atomLibraryKeys } from '@/features/atom-libraries/api/query-keys';

export interface CreateAtomLibraryVariables {
  file: File;
  name: string;
  scope: AtomLibraryScope;
  material: string;
  wavelengthNm: string;
  periodNm: string;
  heightNm: string;
}

export function createAtomLibrary(
  projectId: number,
  { file, ...fields }: CreateAtomLibraryVariables,
): Promise<{ atomLibrary: AtomLibraryDetail; warnings: string[] }> {
  const form = new FormData();
  for (const [key, value] of Object.entries(fields)) if (value.trim() !== '') form.append(key, value.trim());
  form.append('file', file);
  return api.postForm<{ atomLibrary: AtomLibraryDetail; warnings: string[] }>(`/projects/${projectId}/atom-libraries`, form);
}

export function useCreateAtomLibrary(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateAtomLibraryVariables) => createAtomLibrary(projectId, input),
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: atomLibraryKeys.list(projectId) });
    },
  });
}
