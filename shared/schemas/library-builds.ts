/**
 * Library builds: an RCWA sweep of pillars run as a background job, whose result is stored as an atom library.
 * What the API sends and accepts (the spec itself is `LibrarySpec` of shared/optics/library-builder.ts,
 * checked by `parseLibrarySpec`).
 */
import { z } from 'zod';
import type { LibrarySpec } from '../optics/library-builder';

export const LIBRARY_BUILD_STATUSES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export type LibraryBuildStatus = (typeof LIBRARY_BUILD_STATUSES)[number];
export const LIBRARY_BUILD_SCOPES = ['project', 'personal'] as const;
export type LibraryBuildScope = (typeof LIBRARY_BUILD_SCOPES)[number];

/** POST …/library-builds/estimate. */
export const libraryBuildEstimateBodySchema = z.object({ spec: z.unknown() }).strict();
/** POST …/library-builds. */
export const startLibraryBuildBodySchema = z
  .object({
    spec: z.unknown(),
    scope: z.enum(LIBRARY_BUILD_SCOPES),
    subsetSize: z.number().int().min(1).optional(),
  })
  .strict();
export type StartLibraryBuildBody = { spec: LibrarySpec; scope: LibraryBuildScope; subsetSize?: number };

export interface LibraryBuildEstimate {
  atoms: number;
  harmonics: number;
  secondsPerAtom: number;
  seconds: number;
  /** How the figure was obtained. */
  basis: string;
  /** Lattice-diffraction warnings with their numbers. */
  warnings: string[];
}

export interface LibraryBuildProgress {
  atom: number;
  atoms: number;
  fraction: number;
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
  /** The stored atom library when succeeded. */
  libraryId: number | null;
  spec: LibrarySpec;
  estimateSeconds: number;
  warnings: string[];
  createdBy: { id: number; name: string };
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

export interface LibraryBuildAtom {
  id: string;
  widthNm: number;
  lengthNm: number;
  tx: number;
  alphaX: number;
  ty: number;
  alphaY: number;
  zeroOrderX: number;
  zeroOrderY: number;
  otherOrdersX: number;
  otherOrdersY: number;
  reflectedX: number;
  reflectedY: number;
}

export interface LibraryBuildConvergence {
  atomId: string;
  widthNm: number;
  lengthNm: number;
  rows: Array<{ harmonics: number; tx: number; alphaX: number; ty: number; alphaY: number }>;
}

export interface LibraryBuildResult {
  /** The sweep's widths (= lengths), nm. */
  sizesNm: number[];
  /** Sweep order: widths outer, lengths inner. */
  atoms: LibraryBuildAtom[];
  convergence: LibraryBuildConvergence[];
  /** Proposed subset atom ids, when subsetSize was given. */
  subset: string[] | null;
}
