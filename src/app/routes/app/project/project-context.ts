import { useOutletContext } from 'react-router-dom';
import type { Project } from '@shared/schemas/projects';

export interface ProjectOutletContext {
  project: Project;
}

export function useProjectOutlet(): ProjectOutletContext {
  return useOutletContext<ProjectOutletContext>();
}

export function parseProjectId(value: string | undefined): number | null {
  return value && /^[1-9][0-9]{0,9}$/.test(value) ? Number(value) : null;
}
