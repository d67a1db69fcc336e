import { z } from 'zod';
import type { ToleranceResults } from '../optics/tolerance';

export type { ToleranceFigures, TolerancePoint, ToleranceResults } from '../optics/tolerance';

/** Largest size bias or detuning a study accepts, nm. */
export const TOLERANCE_LIMIT_NM = 100;
/** Most values per sweep. */
export const TOLERANCE_MAX_POINTS = 21;

/** Grids a reduced study may simulate (central crop of the device). */
export const REDUCED_CELLS = [64, 128, 256, 512, 1024] as const;

export const DEFAULT_WIDTH_BIAS_NM = [-20, -15, -10, -5, 0, 5, 10, 15, 20];
export const DEFAULT_DETUNE_NM = [-20, -10, 0, 10, 20];

const sweep = (field: string, what: string) =>
  z
    .array(
      z
        .number({ error: `${field}: each value must be a number of nanometres` })
        .min(-TOLERANCE_LIMIT_NM, `${field}: ${what} must lie in −${TOLERANCE_LIMIT_NM}…${TOLERANCE_LIMIT_NM} nm`)
        .max(TOLERANCE_LIMIT_NM, `${field}: ${what} must lie in −${TOLERANCE_LIMIT_NM}…${TOLERANCE_LIMIT_NM} nm`),
      { error: `${field} must be a list of numbers (nm)` },
    )
    .max(TOLERANCE_MAX_POINTS, `${field}: at most ${TOLERANCE_MAX_POINTS} values`)
    // Sorted, without repeats: the curves are drawn against these values.
    .transform((values) => [...new Set(values)].sort((p, q) => p - q));

/** POST …/runs/:runId/tolerance. */
export const toleranceRequestSchema = z
  .object({
    widthBiasNm: sweep('widthBiasNm', 'a width bias').default(DEFAULT_WIDTH_BIAS_NM),
    detuneNm: sweep('detuneNm', 'a detuning').default(DEFAULT_DETUNE_NM),
    /** Reduced grid: simulate only the central cells × cells (ignored when the run has no more cells than that). */
    cells: z
      .number({ error: 'cells must be a number of cells per side' })
      .refine((v) => (REDUCED_CELLS as readonly number[]).includes(v), `cells must be one of ${REDUCED_CELLS.join(', ')}`)
      .optional(),
  })
  .strict()
  .refine((v) => v.widthBiasNm.length + v.detuneNm.length > 0, { message: 'give at least one width bias or one detuning', path: ['widthBiasNm'] });
export type ToleranceRequestInput = z.input<typeof toleranceRequestSchema>;
export type ToleranceRequestBody = z.output<typeof toleranceRequestSchema>;

export const TOLERANCE_STATUSES = ['queued', 'running', 'succeeded', 'failed'] as const;
export type ToleranceStatus = (typeof TOLERANCE_STATUSES)[number];

/** A tolerance study of a run as the API shows it. */
export interface ToleranceStudy {
  id: number;
  runId: number;
  status: ToleranceStatus;
  /** 0…1 */
  progress: number;
  stage: string;
  request: ToleranceRequestBody;
  results: ToleranceResults | null;
  error: string | null;
  queuedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  durationMs: number | null;
}
