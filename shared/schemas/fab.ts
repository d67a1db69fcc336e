/**
 * Design rules of a project, the layout preview of a run, and the fab package (export) of a run: request
 * payloads validated on both sides and the shapes of the answers.
 */
import { z } from 'zod';

const number = (what: string) => z.number({ error: `${what} must be a number` }).refine(Number.isFinite, `${what} must be a finite number`);

/**
 * A project's design rules as people type them: lengths in nm. Defaults = DEFAULT_DESIGN_RULES of
 * shared/optics/drc.ts (common practice, no published source).
 */
export const projectDesignRulesSchema = z.object({
  minGapNm: number('minGapNm').refine((v) => v > 0 && v <= 10_000, 'minGapNm must be greater than 0 and at most 10000 nm'),
  minFeatureNm: number('minFeatureNm').refine((v) => v > 0 && v <= 10_000, 'minFeatureNm must be greater than 0 and at most 10000 nm'),
  maxAspectRatio: number('maxAspectRatio').refine((v) => v > 0 && v <= 1000, 'maxAspectRatio must be greater than 0 and at most 1000'),
});
export type ProjectDesignRules = z.infer<typeof projectDesignRulesSchema>;

export const DEFAULT_PROJECT_DESIGN_RULES: ProjectDesignRules = { minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 };

export interface ProjectDesignRulesView {
  rules: ProjectDesignRules;
  /** True while the project has never saved its own rules (the defaults apply). */
  isDefault: boolean;
  updatedAt: string | null;
  updatedBy: { id: number; name: string } | null;
}

/** Largest side of a layout-preview region, cells. */
export const LAYOUT_REGION_MAX = 128;

const queryInt = (what: string, min: number, max: number) =>
  z
    .string({ error: `${what} is required` })
    .regex(/^-?\d{1,6}$/, `${what} must be a whole number`)
    .transform(Number)
    .refine((v) => v >= min && v <= max, `${what} must lie between ${min} and ${max}`);

export const layoutRegionQuerySchema = z.object({
  x0: queryInt('x0', 0, 65_535).default(0),
  y0: queryInt('y0', 0, 65_535).default(0),
  size: queryInt('size', 1, LAYOUT_REGION_MAX).default(64),
});
export type LayoutRegionQuery = z.infer<typeof layoutRegionQuerySchema>;

/** One placed pillar of a region: cell, centre (nm, types.ts grid), size (nm), rotation (degrees CCW, as in the GDSII). */
export interface LayoutPillar {
  ix: number;
  iy: number;
  xNm: number;
  yNm: number;
  widthNm: number;
  lengthNm: number;
  angleDeg: number;
  atom: number;
}

export type DesignRuleKind = 'gap' | 'feature' | 'aspect-ratio';

/** A design-rule violation with units a person reads: nm for gap and feature, a plain ratio otherwise. */
export interface DesignRuleViolationView {
  kind: DesignRuleKind;
  ix: number;
  iy: number;
  neighbour: { ix: number; iy: number } | null;
  value: number;
  limit: number;
  unit: 'nm' | '';
  atomId: string;
}

export interface LayoutRegion {
  n: number;
  periodNm: number;
  x0: number;
  y0: number;
  /** Cells along each side actually returned (clipped at the layout's edge). */
  width: number;
  height: number;
  pillars: LayoutPillar[];
  /** Every violation with at least one cell in the region, recomputed exactly with the run's rules. */
  violations: DesignRuleViolationView[];
}

/** The design-rule result stored with a run (drc.json): rules used, counts, the first violations. */
export interface RunDesignCheck {
  rules: ProjectDesignRules;
  counts: Record<DesignRuleKind, number>;
  total: number;
  truncated: boolean;
  closestGapNm: number | null;
  violations: DesignRuleViolationView[];
  overrides: ExportOverrideView[];
  /** True when the fab package may be downloaded: no violations, or an owner's override stands. */
  exportAllowed: boolean;
}

export const exportOverrideSchema = z.object({
  reason: z
    .string({ error: 'reason is required' })
    .trim()
    .min(10, 'reason must be at least 10 characters: say why the violations are acceptable')
    .max(500, 'reason must be at most 500 characters'),
});

export interface ExportOverrideView {
  id: number;
  reason: string;
  at: string;
  by: { id: number; name: string } | null;
}

export const fabPackageQuerySchema = z.object({
  layer: queryInt('layer', 0, 255).optional(),
  datatype: queryInt('datatype', 0, 255).optional(),
  dbUnitNm: z
    .string()
    .regex(/^\d{1,4}(\.\d{1,3})?$/, 'dbUnitNm must be a decimal number of nanometres, e.g. 1 or 0.5')
    .transform(Number)
    .refine((v) => v >= 0.001 && v <= 100, 'dbUnitNm must lie between 0.001 and 100 nm')
    .optional(),
});
export type FabPackageQuery = z.infer<typeof fabPackageQuerySchema>;
