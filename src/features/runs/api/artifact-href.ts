import { env } from '@/config/env';

/** Address of a stored run file; the server answers with the file and a Content-Disposition name. */
export function artifactHref(projectId: number, runId: number, name: string): string {
  return `${env.API_URL}/projects/${projectId}/runs/${runId}/artifacts/${encodeURIComponent(name)}`;
}

/** Address of a preview's tile pyramid: its manifest; tile (x, y) of a level at `<address>/<level>/<x>/<y>`. */
export function tilesHref(projectId: number, runId: number, name: string): string {
  return `${env.API_URL}/projects/${projectId}/runs/${runId}/tiles/${encodeURIComponent(name)}`;
}

/** File name offered when saving: project and run in front, so files from several runs do not collide. */
export function artifactFileName(projectId: number, runId: number, name: string): string {
  return `phasewright-p${projectId}-run${runId}-${name}`;
}
