import { z } from 'zod';
import type { PersonRef } from './revisions';

export const RUN_STATUSES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];
export const FINISHED_STATUSES: readonly RunStatus[] = ['succeeded', 'failed', 'cancelled'];

export const RUN_SORT_KEYS = ['queuedAt', 'durationMs', 'status', 'revisionNumber'] as const;
export const listRunsQuerySchema = z.object({
  status: z.enum([...RUN_STATUSES, 'all']).default('all'),
  revision: z.coerce.number().int().positive().optional(),
  sort: z.enum(RUN_SORT_KEYS).default('queuedAt'),
  dir: z.enum(['asc', 'desc']).default('desc'),
});
export type ListRunsQuery = z.infer<typeof listRunsQuerySchema>;

/** A metric as stored with a run: value with its unit and a one-line meaning. */
export interface RunMetric {
  value: number | null;
  unit: string;
  meaning: string;
}

/** The few figures shown in the runs table. */
export interface RunHeadline {
  efficiencyA: number | null;
  efficiencyB: number | null;
  crosstalkDb: number | null;
  zeroOrder: number | null;
}

export interface RunSummary {
  id: number;
  revisionNumber: number;
  status: RunStatus;
  /** 0…1 */
  progress: number;
  stage: string;
  attempts: number;
  error: string | null;
  startedBy: PersonRef | null;
  queuedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  durationMs: number | null;
  headline: RunHeadline;
  /** When the run's files were deleted to free storage (its metrics and events stay); null while kept. */
  filesDeletedAt: string | null;
}

export interface RunEvent {
  at: string;
  status: RunStatus;
  stage: string;
  message: string;
}

export interface RunArtifact {
  name: string;
  mime: string;
  size: number;
  /** What it is, for a person. */
  label: string;
  /** A preview with a tile pyramid (README "Tile pyramids"): the run page loads it by tiles from the tile route. */
  tiled?: boolean;
}

export interface RunDetail extends RunSummary {
  /** Gerchberg–Saxton error per iteration, per hologram channel, as it falls (live while running). */
  convergence: { a: number[]; b: number[] };
  /** Metrics grouped by section (e.g. "channel A", "channel B", "device", "mapping"). */
  metrics: Record<string, Record<string, RunMetric>> | null;
  /** Extra JSON results for plots (radial profiles vs analytic curves, mapping histogram…). */
  plots: Record<string, unknown> | null;
  events: RunEvent[];
  artifacts: RunArtifact[];
}
