/**
 * Words on screen and in reports: metric keys, units, phase-term parameters and run states in words, and
 * formulas written in the engine's TeX-like notation found in running text and typeset by KaTeX.
 */
import katex from 'katex';
import { describe, expect, it } from 'vitest';
import { formatMetricValue, metricName, RUN_STATUS_NAMES, sectionName, termText } from '../../shared/display-names';
import { buildReportModel } from '../../shared/report/design-report';
import { reportHtml } from '../../server/components/fab/report-html';
import { describeDesignPath } from '../../server/components/runs/run-outcome';
import { designSchema } from '../../shared/schemas/design';
import { splitMath, toTex } from '../../shared/split-math';

describe('display names', () => {
  it('names metrics and sections, never by their keys', () => {
    expect(metricName('strehlVsDesign')).toBe('Strehl ratio against the design');
    expect(metricName('focalSpotZeroSquare')).toMatch(/^Focal spot first zero/);
    expect(metricName('focalSpotZeroMeasured')).toBe('Focal spot first zero, simulated');
    expect(metricName('sinBeta')).not.toMatch(/NA/);
    expect(sectionName('extra input')).toBe('Third input');
    expect(sectionName('channel A')).toBe('Channel A');
    expect(Object.values(RUN_STATUS_NAMES)).toEqual(['Waiting', 'Running', 'Finished', 'Failed', 'Cancelled']);
  });

  it('gives dimensionless values no pseudo-unit and lengths in nm, µm or mm', () => {
    expect(formatMetricValue({ value: 0.15, unit: 'NA', meaning: '' })).toBe('0.15');
    expect(formatMetricValue({ value: 0.9876, unit: 'ratio', meaning: '' })).toBe('0.9876');
    expect(formatMetricValue({ value: 262144, unit: 'cell·|E|²', meaning: '' })).toBe('2.621e+5');
    expect(formatMetricValue({ value: 1.5e-3, unit: 'm', meaning: '' })).toBe('1.5 mm');
    expect(formatMetricValue({ value: 2.05e-6, unit: 'm', meaning: '' })).toBe('2.05 µm');
    expect(formatMetricValue({ value: 4.3e-7, unit: 'm', meaning: '' })).toBe('430 nm');
    expect(formatMetricValue({ value: -32.04, unit: 'dB', meaning: '' })).toBe('−32.0 dB');
  });

  it('writes phase terms with parameter names and units', () => {
    expect(termText({ kind: 'tilt', thetaXDeg: 10, thetaYDeg: 5 })).toBe('tilt: deflection θx 10°, deflection θy 5°');
    expect(termText({ kind: 'axicon', numericalAperture: 0.15 })).toBe('axicon: sin β of the cone 0.15');
    expect(termText({ kind: 'lens', focalLengthUm: 300 })).toBe('lens: focal length f 300 µm');
  });

  it('the report shows display names, never internal keys', () => {
    const design = designSchema.parse({
      name: 'Tilt and lens',
      setup: { wavelengthNm: 633, periodNm: 300, cells: 64 },
      polarization: { kind: 'linear', angleDeg: 0 },
      channels: { a: { terms: [{ kind: 'tilt', thetaXDeg: 10 }] }, b: { terms: [{ kind: 'lens', focalLengthUm: 300 }] } },
    });
    const model = buildReportModel({
      projectName: 'P',
      runId: 1,
      revisionNumber: 1,
      finishedAt: null,
      design,
      metrics: { 'channel B': { strehlVsDesign: { value: 0.93, unit: 'ratio', meaning: 'peak ratio' }, meanError: { value: 0.03, unit: '|t|²', meaning: 'mean of |tx e^{iαx} − e^{iδx}|²' } }, 'extra input': { zeroOrder: { value: 0.01, unit: 'fraction', meaning: 'z' } } },
      inputs: null,
      library: { name: 'demo', approximate: true, source: null, material: null, atoms: 10 },
      check: { rules: { minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 }, total: 0, counts: { gap: 0, feature: 0, 'aspect-ratio': 0 }, closestGapNm: null, violations: [], overrides: [] } as never,
    });
    const text = JSON.stringify(model);
    for (const key of ['strehlVsDesign', 'thetaXDeg', 'focalLengthUm', 'extra input', 'unit']) expect(text).not.toContain(key);
    expect(text).toContain('Strehl ratio against the design');
    expect(text).toContain('deflection θx 10°');
    expect(text).toContain('Third input');
    // report.html: the same words, and the formula as MathML (drawn by the browser without scripts).
    const html = reportHtml(model, [], 'exported');
    const shown = html.replace(/<annotation[^]*?<\/annotation>/g, '');
    for (const key of ['strehlVsDesign', 'thetaXDeg', 'meanError', 'e^{']) expect(shown).not.toContain(key);
    expect(html).toMatch(/<math[^>]*>[^]*<\/math>/);
    expect(html).toContain('Mean mapping error');
    // A failed run's message names the field in words too.
    expect(describeDesignPath(design, 'channels.a.terms.0.thetaXDeg')).toBe('channel A, term 1 (tilt), deflection θx');
    expect(describeDesignPath(design, 'channels.b.terms.0.focalLengthUm')).toBe('channel B, term 1 (lens), focal length f');
  });
});

describe('formulas in running text', () => {
  it('finds the formulas of a metric meaning and leaves the prose', () => {
    const parts = splitMath('mean over cells of |tx e^{iαx} − e^{iδx}|² + |ty e^{iαy} − e^{iδy}|² of the chosen atom (0 = exact)');
    expect(parts.filter((p) => p.math).map((p) => p.text)).toEqual(['e^{iαx} − e^{iδx}|²', 'e^{iαy} − e^{iδy}|²']);
    expect(parts.map((p) => p.text).join('')).toContain('of the chosen atom (0 = exact)');
    expect(splitMath("j'_{ℓ,1}/(k sinβ), first maximum").filter((p) => p.math).map((p) => p.text)).toEqual(["j'_{ℓ,1}/(k"]);
    expect(splitMath('phase $e^{iφ}$ here')).toEqual([
      { math: false, text: 'phase ' },
      { math: true, text: 'e^{iφ}' },
      { math: false, text: ' here' },
    ]);
    expect(splitMath('sin β = k_r/k of the axicon').filter((p) => p.math).map((p) => p.text)).toEqual(['k_r/k']);
    expect(splitMath('see phase_a.npy and farfield_a_out-b.png').every((p) => !p.math)).toBe(true);
    expect(splitMath('plain words, 0.5 and 2')).toEqual([{ math: false, text: 'plain words, 0.5 and 2' }]);
  });

  it('KaTeX reads every formula the engine writes in its metric meanings', () => {
    for (const formula of ['e^{iαx} − e^{iδx}|² + |ty e^{iαy} − e^{iδy}|²', '|⟨ideal a·e^{iφ} | realized', "j'_{ℓ,1}/(k", 'J_ℓ²(k']) {
      const html = katex.renderToString(toTex(formula), { throwOnError: true, strict: 'ignore' });
      expect(html).toContain('katex');
    }
  });
});
