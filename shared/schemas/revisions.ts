import { z } from 'zod';
import { designSchema, type Design } from './design';

export const createRevisionSchema = z.object({
  design: designSchema,
  message: z.string().trim().max(500, 'Use at most 500 characters').default(''),
});
export type CreateRevisionInput = z.input<typeof createRevisionSchema>;

export interface PersonRef {
  id: number;
  name: string;
}

/** A saved, immutable version of a project's design. Numbers count 1, 2, 3… per project. */
export interface RevisionSummary {
  id: number;
  number: number;
  message: string;
  designName: string;
  createdAt: string;
  createdBy: PersonRef | null;
  runCount: number;
}

export interface Revision extends RevisionSummary {
  design: Design;
}

/** One changed leaf between two designs, by dotted path (arrays by index). */
export interface DesignChange {
  path: string;
  a: unknown;
  b: unknown;
}
