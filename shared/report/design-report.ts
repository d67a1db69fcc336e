/**
 * The content of a run's design report, built once from the run's records and drawn twice: as the
 * standalone report.html inside the fab package (server) and as the print-friendly report page (client).
 * Pure data in, plain text out — no DOM, no Node API.
 */
import { valueWords } from '../design-values';
import { formatMetricValue, metricName, sectionName, termText } from '../display-names';
import type { Design } from '../schemas/design';
import type { RunDesignCheck } from '../schemas/fab';
import type { RunMetric } from '../schemas/runs';

export const LASER_SAFETY_CAUTION =
  'Focused and Bessel beams concentrate laser power along a line or in a spot. Follow ANSI Z136.1 / IEC 60825-1 and your institution’s laser safety officer.';
export const FABRICATION_CAUTION =
  'Fabrication uses hazardous chemistry (resists, developers, etchants). Follow your cleanroom’s own procedures for resist, developer and etch chemistry, and its safety rules.';

/** A Jones vector as stored in metrics.json: [[x.re, x.im], [y.re, y.im]]. */
export type StoredJones = [[number, number], [number, number]];

export interface ReportInput {
  projectName: string;
  runId: number;
  revisionNumber: number;
  finishedAt: string | null;
  design: Design;
  metrics: Record<string, Record<string, RunMetric>> | null;
  /** Input states A and B from metrics.json, when the run has it. */
  inputs: { a: StoredJones; b: StoredJones } | null;
  library: { name: string; approximate: boolean; source: string | null; material: string | null; atoms: number };
  check: RunDesignCheck;
  /** File names of the uploads the design uses (absent: named by id only). */
  uploads?: { id: number; name: string }[];
}

export interface ReportSection {
  id: string;
  title: string;
  rows: [string, string][];
  paragraphs: string[];
  /** Optional table: header and rows. */
  table?: { head: string[]; rows: string[][] };
}

export interface ReportModel {
  title: string;
  subtitle: string;
  sections: ReportSection[];
  cautions: { title: string; text: string }[];
}

const trim = (text: string) => (text.includes('.') && !text.includes('e') ? text.replace(/\.?0+$/, '') : text);
const num = (v: number, digits = 4) => trim(v.toPrecision(digits));

/** Complex number a + ib in words. Example: complexText(0.7071, -0.7071) → '0.7071 − 0.7071i'. */
export function complexText(re: number, im: number): string {
  const r = Math.abs(re) < 5e-5 ? 0 : re;
  const i = Math.abs(im) < 5e-5 ? 0 : im;
  if (i === 0) return r.toFixed(4);
  if (r === 0) return `${i.toFixed(4)}i`;
  return `${r.toFixed(4)} ${i < 0 ? '−' : '+'} ${Math.abs(i).toFixed(4)}i`;
}

/** Example: jonesText([[0.7071, 0], [0, 0.7071]]) → '[0.7071, 0.7071i]'. */
export function jonesText(v: StoredJones): string {
  return `[${complexText(v[0][0], v[0][1])}, ${complexText(v[1][0], v[1][1])}]`;
}

function polarizationText(design: Design): string {
  const p = design.polarization;
  if (p.kind === 'linear') return `linear, ${num(p.angleDeg)}° from x, and its orthogonal partner`;
  if (p.kind === 'circular') return `${p.handedness}-circular and its orthogonal partner (Born & Wolf handedness)`;
  return `elliptical ψ = ${num(p.psiDeg)}°, χ = ${num(p.chiDeg)}°, and its orthogonal partner`;
}

const KIND_WORDS = { gap: 'gap', feature: 'feature', 'aspect-ratio': 'aspect ratio' } as const;

export function buildReportModel(input: ReportInput): ReportModel {
  const { design, check, library } = input;
  const uploadNames = input.uploads ? new Map(input.uploads.map((u) => [u.id, u.name])) : undefined;
  const beamLike = (['a', 'b'] as const).some((c) => design.channels[c].terms.some((t) => t.kind === 'axicon' || t.kind === 'lens' || t.kind === 'vortex'));
  const sections: ReportSection[] = [];
  sections.push({
    id: 'setup',
    title: 'Setup',
    rows: [
      ['Design', design.name],
      ['Wavelength λ', `${num(design.setup.wavelengthNm)} nm`],
      ['Lattice period P', `${num(design.setup.periodNm)} nm`],
      ['Cells', `${design.setup.cells} × ${design.setup.cells} (${num((design.setup.cells * design.setup.periodNm) / 1000)} µm a side)`],
      ['Illumination', design.setup.illumination.kind === 'plane' ? 'plane wave' : `Gaussian, waist ${num(design.setup.illumination.waistUm)} µm`],
      ['Light enters', valueWords('lightFrom', design.setup.lightFrom) ?? design.setup.lightFrom],
      ...(design.setup.platform ? [['Platform', design.setup.platform] as [string, string]] : []),
    ],
    paragraphs: [],
  });
  const pairRows: [string, string][] = [['Pair', polarizationText(design)]];
  if (input.inputs) {
    pairRows.push(['Input A (Jones vector [x, y])', jonesText(input.inputs.a)], ['Input B (Jones vector [x, y])', jonesText(input.inputs.b)]);
  }
  sections.push({
    id: 'polarization',
    title: 'Polarization pair',
    rows: pairRows,
    paragraphs: ['Time dependence exp(−iωt); right-circular = [1, −i]/√2 (Born & Wolf).'],
  });
  sections.push({
    id: 'recipes',
    title: 'Channel recipes',
    rows: (['a', 'b'] as const).map((c) => [
      `Channel ${c.toUpperCase()}${design.channels[c].label ? ` — ${design.channels[c].label}` : ''}`,
      design.channels[c].terms.map((t) => termText(t, (id) => uploadNames?.get(id))).join(' + '),
    ]),
    paragraphs: [],
  });
  if (input.metrics) {
    const rows: string[][] = [];
    for (const [section, group] of Object.entries(input.metrics)) {
      for (const [key, metric] of Object.entries(group)) rows.push([sectionName(section), metricName(key), formatMetricValue(metric), metric.meaning]);
    }
    sections.push({ id: 'metrics', title: 'Metrics', rows: [], paragraphs: [], table: { head: ['Section', 'Metric', 'Value', 'Meaning'], rows } });
  }
  const ruleRows: [string, string][] = [
    ['Rules used', `minimum gap ${num(check.rules.minGapNm)} nm, minimum feature ${num(check.rules.minFeatureNm)} nm, maximum aspect ratio ${num(check.rules.maxAspectRatio)}`],
    ['Result', check.total === 0 ? 'no violations' : `${check.total} violation${check.total === 1 ? '' : 's'}: ${(['gap', 'feature', 'aspect-ratio'] as const).filter((k) => check.counts[k] > 0).map((k) => `${check.counts[k]} ${KIND_WORDS[k]}`).join(', ')}`],
  ];
  if (check.closestGapNm !== null) ruleRows.push(['Closest gap', `${num(check.closestGapNm)} nm`]);
  const paragraphs: string[] = [];
  for (const o of check.overrides) {
    paragraphs.push(`Export override by ${o.by?.name ?? 'a former member'} on ${o.at.slice(0, 16).replace('T', ' ')} UTC: “${o.reason}”`);
  }
  sections.push({
    id: 'design-rules',
    title: 'Design-rule check',
    rows: ruleRows,
    paragraphs,
    table:
      check.violations.length > 0
        ? {
            head: ['Kind', 'Cell (ix, iy)', 'Neighbour', 'Value', 'Limit'],
            rows: check.violations.slice(0, 20).map((v) => [
              KIND_WORDS[v.kind],
              `(${v.ix}, ${v.iy})`,
              v.neighbour ? `(${v.neighbour.ix}, ${v.neighbour.iy})` : '—',
              `${num(v.value)}${v.unit ? ` ${v.unit}` : ''}`,
              `${num(v.limit)}${v.unit ? ` ${v.unit}` : ''}`,
            ]),
          }
        : undefined,
  });
  sections.push({
    id: 'library',
    title: 'Atom library',
    rows: [
      // Say "(approximate)" once: the demo library's name already carries it.
      ['Library', `${library.name}${library.approximate && !/\(approximate\)/i.test(library.name) ? ' (approximate)' : ''}`],
      ['Atoms', String(library.atoms)],
      ...(library.material ? [['Material', library.material] as [string, string]] : []),
      ['Source', library.source ?? 'not stated'],
    ],
    paragraphs: library.approximate
      ? ['This library is APPROXIMATE: its transmissions come from a simple model, not from full-wave simulations of your process. Check the design against your own data before fabrication.']
      : [],
  });
  const cautions = [
    { title: 'Laser safety', text: LASER_SAFETY_CAUTION },
    { title: 'Fabrication', text: FABRICATION_CAUTION },
  ];
  if (!beamLike) cautions[0] = { title: 'Laser safety', text: `${LASER_SAFETY_CAUTION} Holographic images also concentrate light in their bright spots.` };
  return {
    title: `Design report — ${design.name}`,
    subtitle: `${input.projectName} · revision ${input.revisionNumber} · run ${input.runId}${input.finishedAt ? ` · finished ${input.finishedAt.slice(0, 16).replace('T', ' ')} UTC` : ''}`,
    sections,
    cautions,
  };
}
