import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ProjectDesignRules, ProjectDesignRulesView } from '@shared/schemas/fab';
import { api } from '@/lib/api-client';
import { fabKeys } from '@/features/fab/api/query-keys';

export function updateDesignRules(projectId: number, rules: ProjectDesignRules) {
  return api.put<ProjectDesignRulesView>(`/projects/${projectId}/design-rules`, rules);
}

export function useUpdateDesignRules(projectId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (rules: ProjectDesignRules) => updateDesignRules(projectId, rules),
    onSuccess: (view) => queryClient.setQueryData(fabKeys.designRules(projectId), view),
  });
}
