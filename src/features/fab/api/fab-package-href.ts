import { apiUrl } from '@/lib/api-client';

/** Download link of a run's fab package; options left out use the run's own layer, datatype and 1 nm. */
export function fabPackageHref(projectId: number, runId: number, options: { layer?: number; datatype?: number; dbUnitNm?: number } = {}) {
  const search = new URLSearchParams();
  for (const [key, value] of Object.entries(options)) if (value !== undefined) search.set(key, String(value));
  const query = search.toString();
  return apiUrl(`/projects/${projectId}/runs/${runId}/fab-package.zip${query ? `?${query}` : ''}`);
}
