import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ProjectDesignRulesView } from '@shared/schemas/fab';
import { api } from '@/lib/api-client';
import { fabKeys } from '@/features/fab/api/query-keys';

export function getDesignRules(projectId: number, signal?: AbortSignal) {
  return api.get<ProjectDesignRulesView>(`/projects/${projectId}/design-rules`, { signal });
}

export function designRulesQueryOptions(projectId: number) {
  return queryOptions({ queryKey: fabKeys.designRules(projectId), queryFn: ({ signal }) => getDesignRules(projectId, signal) });
}

export function useDesignRules(projectId: number) {
  return useQuery(designRulesQueryOptions(projectId));
}
