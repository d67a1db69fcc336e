import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ReportInput } from '@shared/report/design-report';
import { api } from '@/lib/api-client';
import { fabKeys } from '@/features/fab/api/query-keys';

export async function getRunReport(projectId: number, runId: number, signal?: AbortSignal) {
  return (await api.get<{ report: ReportInput }>(`/projects/${projectId}/runs/${runId}/report`, { signal })).report;
}

export function runReportQueryOptions(projectId: number, runId: number) {
  return queryOptions({ queryKey: fabKeys.report(projectId, runId), queryFn: ({ signal }) => getRunReport(projectId, runId, signal) });
}

export function useRunReport(projectId: number, runId: number) {
  return useQuery(runReportQueryOptions(projectId, runId));
}
