import { env } from '@/config/env';

/** Address of a stored run file; the server answers with the file and a Content-Disposition name. */
export function artifactHref(projectId: number, runId: number, name: string): string {
  return `${env.API_URL}/projects/${projectId}/runs/${runId}/artifacts/${encodeURIComponent(name)}`;
}

/** File name offered when saving: project and run in front, so files from several runs do not collide. */
export function artifactFileName(projectId: number, runId: number, name: string): string {
  return `phasewright-p${projectId}-run${runId}-${name}`;
}
