import { createContext, useContext, useMemo } from 'react';
import { artifactFileName, artifactHref, tilesHref } from '@/features/runs/api/artifact-href';

/** Where the files of the run on screen are fetched from, and the name offered when one is saved. */
export interface ArtifactAddress {
  href: (name: string) => string;
  fileName: (name: string) => string;
  /** Where a preview's tile pyramid is (artifact-href.ts `tilesHref`). */
  tiles: (name: string) => string;
}

/**
 * Overrides the address of run files for the components below it (the shared page reads them through its
 * share link); without a provider the project's own run URLs are used.
 */
export const ArtifactUrlContext = createContext<ArtifactAddress | null>(null);

export function useArtifactAddress(projectId: number, runId: number): ArtifactAddress {
  const override = useContext(ArtifactUrlContext);
  return useMemo(
    () =>
      override ?? {
        href: (name: string) => artifactHref(projectId, runId, name),
        fileName: (name: string) => artifactFileName(projectId, runId, name),
        tiles: (name: string) => tilesHref(projectId, runId, name),
      },
    [override, projectId, runId],
  );
}
