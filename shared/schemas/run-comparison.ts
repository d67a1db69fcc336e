import { z } from 'zod';
import type { RunMetric, RunSummary } from './runs';

const runId = z.coerce
  .number({ message: 'must be a run id (a positive whole number)' })
  .int('must be a run id (a positive whole number)')
  .positive('must be a run id (a positive whole number)');

/** `?a=<run id>&b=<run id>`: the two runs of one project to compare (any revisions; not the same run). */
export const compareRunsQuerySchema = z
  .object({ a: runId, b: runId })
  .refine((q) => q.a !== q.b, { message: 'choose two different runs', path: ['b'] });
export type CompareRunsQuery = z.infer<typeof compareRunsQuerySchema>;

export const COMPARE_CHANNELS = ['a', 'b'] as const;
export const COMPARE_VIEWS = ['a', 'b', 'difference'] as const;

/** One far-field picture of a comparison: `channel` is the input (A or B), `show` run a, run b or b − a. */
export const comparePictureQuerySchema = z
  .object({
    a: runId,
    b: runId,
    channel: z.enum(COMPARE_CHANNELS, { message: 'channel must be a or b' }),
    show: z.enum(COMPARE_VIEWS, { message: 'show must be a, b or difference' }),
  })
  .refine((q) => q.a !== q.b, { message: 'choose two different runs', path: ['b'] });
export type ComparePictureQuery = z.infer<typeof comparePictureQuerySchema>;

/** How one metric changed from run a to run b. */
export interface MetricChange {
  section: string;
  key: string;
  unit: string;
  meaning: string;
  a: number | null;
  b: number | null;
  /** b − a in the metric's unit; null when either side has no value. */
  delta: number | null;
  /** 100·(b − a)/|a|; null when either side has no value or a is 0. */
  percent: number | null;
}

/** The brightness scale both runs' far fields under one input are painted on. */
export interface FarFieldScale {
  channel: (typeof COMPARE_CHANNELS)[number];
  /**
   * Full scale of both pictures (√ of it is the top colour): the brighter run's brightest preview pixel away
   * from the zero order, as a fraction of that run's incident power falling in one preview pixel.
   */
  fullScale: number;
  /** Full scale of the difference picture: the largest |b − a| of one preview pixel, same unit; 0 when equal. */
  differenceScale: number | null;
}

export interface FarFieldComparison {
  /** Side in pixels of the pictures (both runs pooled to it). */
  side: number;
  /** Direction cosines covered by each picture, −extent…extent in u and v, per run. */
  extent: { a: number; b: number };
  scales: FarFieldScale[];
  /** Why there is no difference view (the runs sample different directions), else null. */
  differenceNote: string | null;
}

export interface RunComparison {
  a: RunSummary;
  b: RunSummary;
  metrics: MetricChange[];
  /** null when a run has no stored far fields, with `farFieldsNote` saying why. */
  farFields: FarFieldComparison | null;
  farFieldsNote: string | null;
}

export type { RunMetric };
