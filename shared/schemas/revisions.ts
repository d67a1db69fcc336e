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

export const compareRevisionsQuerySchema = z.object({
  a: z.coerce.number({ error: 'a must be a revision number' }).int().positive('a must be a revision number'),
  b: z.coerce.number({ error: 'b must be a revision number' }).int().positive('b must be a revision number'),
});

/** `GET …/revisions/compare?a=&b=`: both revisions with their designs and every changed leaf (a → b). */
export interface RevisionComparison {
  a: Revision;
  b: Revision;
  changes: DesignChange[];
}
