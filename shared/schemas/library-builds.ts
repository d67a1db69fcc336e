/**
 * Library builds: computing a meta-atom library by RCWA on the run workers (server/components/library-builds/).
 * The spec is the command line's SPEC.json (`LibrarySpec` of shared/optics/library-builder.ts, lengths in nm),
 * checked field by field by `parseLibrarySpec` on the server; these schemas check the body around it.
 */
import { z } from 'zod';
import { MAX_LIBRARY_ATOMS, type BuiltAtomPowers, type LibrarySpec } from '../optics/library-builder';

export const LIBRARY_BUILD_STATUSES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export type LibraryBuildStatus = (typeof LIBRARY_BUILD_STATUSES)[number];

export const LIBRARY_BUILD_SCOPES = ['project', 'personal'] as const;
export type LibraryBuildScope = (typeof LIBRARY_BUILD_SCOPES)[number];

/** POST …/library-builds/estimate. */
export const libraryEstimateRequestSchema = z
  .object({ spec: z.unknown().refine((v) => v !== undefined, 'spec is missing: send the build spec as { "spec": { … } }') })
  .strict();

/** POST …/library-builds. */
export const libraryBuildRequestSchema = z
  .object({
    spec: z.unknown().refine((v) => v !== undefined, 'spec is missing: send the build spec as { "spec": { … }, "scope": … }'),
    scope: z.enum(LIBRARY_BUILD_SCOPES, { error: `scope must be one of ${LIBRARY_BUILD_SCOPES.join(', ')}` }),
    subsetSize: z
      .number({ error: 'subsetSize must be a whole number of atoms' })
      .int('subsetSize must be a whole number of atoms')
      .min(1, 'subsetSize must be at least 1')
      .max(MAX_LIBRARY_ATOMS, `subsetSize must be at most ${MAX_LIBRARY_ATOMS}`)
      .optional(),
  })
  .strict();
export type LibraryBuildRequest = z.infer<typeof libraryBuildRequestSchema>;

/** The cost of a build before it starts. */
export interface LibraryBuildEstimate {
  atoms: number;
  harmonics: number;
  secondsPerAtom: number;
  /** Sweep and convergence report together, wall time on the threads one build gets. */
  seconds: number;
  /** How the figure was obtained. */
  basis: string;
  /** Lattice-diffraction warnings with their numbers. */
  warnings: string[];
}

export interface LibraryBuildProgress {
  /** Atoms done. */
  atom: number;
  atoms: number;
  fraction: number;
  /** Wall time of the sweep so far divided by the atoms done. */
  secondsPerAtom: number;
}

export interface LibraryBuild {
  id: number;
  projectId: number;
  scope: LibraryBuildScope;
  name: string;
  status: LibraryBuildStatus;
  progress: LibraryBuildProgress | null;
  error: string | null;
  /** The stored atom library (not approximate) once the build succeeded. */
  libraryId: number | null;
  spec: LibrarySpec;
  estimateSeconds: number;
  warnings: string[];
  createdBy: { id: number; name: string };
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

/** One atom of a build: its size, zeroth-order transmission and phases, and its powers (BuiltAtomPowers). */
export interface LibraryBuildAtom extends BuiltAtomPowers {
  widthNm: number;
  lengthNm: number;
  tx: number;
  alphaX: number;
  ty: number;
  alphaY: number;
}

export interface LibraryConvergenceRow {
  harmonics: number;
  tx: number;
  alphaX: number;
  ty: number;
  alphaY: number;
}

export interface LibraryBuildResult {
  /** The sweep's widths (= lengths), nm. */
  sizesNm: number[];
  /** Sweep order: widths outer, lengths inner. */
  atoms: LibraryBuildAtom[];
  /** The smallest, middle and largest square pillar of the sweep at increasing harmonics (the last row: the build's own). */
  convergence: Array<{ atomId: string; widthNm: number; lengthNm: number; rows: LibraryConvergenceRow[] }>;
  /** Proposed subset atom ids (proposeSubset), when subsetSize was given. */
  subset: string[] | null;
  /**
   * How many of `atoms` the stored library keeps: all of them, or with `sweep.anyRotation` only the pillars that
   * fit every rotation. Absent in results stored before it was recorded.
   */
  storedCount?: number;
}
