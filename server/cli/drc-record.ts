/**
 * The drc.json record of a run: the design rules used (nm), the number of violations of each kind, and the
 * first violations the engine kept (pipeline.ts caps the list) with lengths in nm — what the run page,
 * the design report and the fab-package refusal read.
 */
import type { DrcViolation } from '../../shared/optics/drc';
import type { DesignRun } from '../../shared/optics/pipeline';
import type { DesignRuleViolationView } from '../../shared/schemas/fab';

/** Lengths in nm rounded to 0.001 nm; aspect ratios as they are. Example: a 3.2e-8 m gap → value 32, unit 'nm'. */
export function violationView(v: DrcViolation): DesignRuleViolationView {
  const length = v.kind !== 'aspect-ratio';
  const nm = (m: number) => Math.round(m * 1e12) / 1e3;
  return {
    kind: v.kind,
    ix: v.ix,
    iy: v.iy,
    neighbour: v.neighbour ?? null,
    value: length ? nm(v.value) : v.value,
    limit: length ? nm(v.limit) : v.limit,
    unit: length ? 'nm' : '',
    atomId: v.atomId,
  };
}

export function drcRecord(run: DesignRun): Record<string, unknown> {
  const { drc } = run;
  const total = drc.counts.gap + drc.counts.feature + drc.counts['aspect-ratio'];
  return {
    format: 'phasewright-drc/1',
    rules: run.design.designRules,
    rulesMeaning: 'minGapNm: smallest edge-to-edge distance between neighbouring (rotated) pillars; minFeatureNm: smallest pillar side; maxAspectRatio: height ÷ smallest side',
    counts: drc.counts,
    total,
    truncated: drc.truncated || drc.violations.length < total,
    closestGapNm: drc.closestGap === null ? null : Math.round(drc.closestGap * 1e12) / 1e3,
    violations: drc.violations.map(violationView),
  };
}
