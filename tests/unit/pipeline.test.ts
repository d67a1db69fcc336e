import { beforeAll, describe, expect, it } from 'vitest';
import type { AtomLibrary, MetaAtom } from '../../shared/optics/atoms';
import { realizeDevice } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { DesignUnitsError } from '../../shared/optics/design-units';
import { initFft } from '../../shared/optics/fft';
import { retrievePhase } from '../../shared/optics/gerchberg-saxton';
import { runDesign, retrieveSequentially, type ChannelRetriever, type DesignResources } from '../../shared/optics/pipeline';
import { circularState } from '../../shared/optics/polarization';
import { simulateDevice } from '../../shared/optics/simulate';
import type { GrayImage } from '../../shared/optics/target';
import { designSchema, type DesignInput } from '../../shared/schemas/design';
import { screenSamples } from '../support/screen-samples';

beforeAll(async () => {
  await initFft();
});

const LAMBDA_NM = 633;
const PERIOD_NM = 450;
const TWO_PI = 2 * Math.PI;

function atom(id: string, alphaX: number, alphaY: number, t = 1): MetaAtom {
  return { id, shape: 'rect', width: 100e-9, length: 200e-9, height: 600e-9, period: PERIOD_NM * 1e-9, tx: t, alphaX, ty: t, alphaY };
}

function library(atoms: MetaAtom[], name: string): AtomLibrary {
  return { name, lambda: LAMBDA_NM * 1e-9, period: PERIOD_NM * 1e-9, height: 600e-9, material: 'test', approximate: false, atoms };
}

/** Lossless half-wave atoms (retardance π) on 64 propagation phases: exact for the circular basis up to π/64. */
const halfWaveLibrary = library(
  Array.from({ length: 64 }, (_, j) => atom(`h${j}`, (TWO_PI * j) / 64, (TWO_PI * j) / 64 - Math.PI)),
  'ideal half-wave atoms',
);

/** Lossless atoms on a 32 × 32 grid of (αx, αy): the linear basis realized to within π/32 per axis. */
const gridLibrary = library(
  Array.from({ length: 32 * 32 }, (_, j) => atom(`g${j}`, (TWO_PI * (j % 32)) / 32, (TWO_PI * Math.floor(j / 32)) / 32)),
  'ideal phase grid',
);

/** Our own test pictures: a filled square and a cross. */
function square(): GrayImage {
  const s = 16;
  return { width: s, height: s, pixels: Uint8Array.from({ length: s * s }, (_, i) => (i % s > 3 && i % s < 12 && i / s > 3 && i / s < 12 ? 255 : 40)) };
}
function cross(): GrayImage {
  const s = 16;
  return { width: s, height: s, pixels: Uint8Array.from({ length: s * s }, (_, i) => (i % s === 7 || i % s === 8 || Math.floor(i / s) === 7 || Math.floor(i / s) === 8 ? 255 : 30)) };
}

function resources(lib: AtomLibrary, extra: Partial<DesignResources> = {}): DesignResources {
  return {
    images: (ref) => (ref.source === 'demo' && ref.name === 'lighthouse' ? square() : cross()),
    phaseMaps: () => {
      throw new Error('no phase maps in this test');
    },
    library: lib,
    ...extra,
  };
}

function design(input: Omit<DesignInput, 'name' | 'setup'> & { cells: number }) {
  const { cells, ...rest } = input;
  return designSchema.parse({ name: 'test', setup: { wavelengthNm: LAMBDA_NM, periodNm: PERIOD_NM, cells }, ...rest });
}

/** Tilt (degrees) that puts the first order `pixels` far-field pixels from the zero order: sinθ = m·λ/(N·P) (grating equation). */
const tiltDeg = (pixels: number, n: number) => (Math.asin((pixels * LAMBDA_NM) / (n * PERIOD_NM)) * 180) / Math.PI;
const sum = (a: ArrayLike<number>) => Array.from(a).reduce((s, v) => s + v, 0);

describe('design run (pipeline.ts)', () => {
  it('circular basis: input A leaves in the opposite handedness with phase φA, at the grating-equation pixel (Mueller et al. 2017)', async () => {
    const n = 64;
    const d = design({
      cells: n,
      polarization: { kind: 'circular', handedness: 'left' },
      channels: { a: { terms: [{ kind: 'tilt', thetaXDeg: tiltDeg(8, n) }] }, b: { terms: [{ kind: 'tilt', thetaYDeg: tiltDeg(-5, n) }] } },
    });
    const run = await runDesign(d, resources(halfWaveLibrary));
    // λA* of left-circular [1, i]/√2 is right-circular [1, −i]/√2 (polarization.ts convention).
    expect(run.analyser[0][1][1]).toBeCloseTo(circularState('right')[1][1], 15);
    const c = n / 2;
    const underA = run.farFields.a;
    const power = underA.incidentPower;
    expect(power).toBe(n * n);
    // Unitary far field and lossless atoms: all incident power comes out (Parseval; float32 FFT → 1e-5).
    expect(sum(underA.total) / power).toBeCloseTo(1, 5);
    expect(sum(underA.analyserA) / power).toBeGreaterThan(0.999);
    expect(underA.analyserA[c * n + c + 8] / power).toBeGreaterThan(0.99);
    expect(sum(underA.analyserB) / power).toBeLessThan(1e-3);
    const underB = run.farFields.b;
    expect(underB.analyserB[(c - 5) * n + c] / power).toBeGreaterThan(0.99);
    // Phase φA carried by the converted light: the realized output overlaps the designed wavefront.
    expect(run.metrics.channels.a.wavefrontEfficiency.value!).toBeGreaterThan(0.99);
    expect(run.metrics.channels.a.phaseRmsError.value!).toBeLessThan(0.05);
    // Linear 45° input = equal parts of A and B: half the power in each first order.
    expect(run.farFields.extra.total[c * n + c + 8] / power).toBeCloseTo(0.5, 2);
    expect(run.farFields.extra.total[(c - 5) * n + c] / power).toBeCloseTo(0.5, 2);
  });

  it('retardance Γ = π/2 leaves cos²(Γ/2) = 1/2 of circular light unconverted, in the zero order (geometric phase, PRODUCT.md)', async () => {
    const n = 64;
    const quarterWave = library(
      Array.from({ length: 64 }, (_, j) => atom(`q${j}`, (TWO_PI * j) / 64, (TWO_PI * j) / 64 - Math.PI / 2)),
      'quarter-wave atoms',
    );
    const d = design({
      cells: n,
      polarization: { kind: 'circular', handedness: 'left' },
      channels: { a: { terms: [{ kind: 'tilt', thetaXDeg: tiltDeg(8, n) }] }, b: { terms: [{ kind: 'tilt', thetaXDeg: tiltDeg(-8, n) }] } },
    });
    const run = await runDesign(d, resources(quarterWave));
    expect(run.metrics.mapping.unconvertedCircular.value!).toBeCloseTo(0.5, 12);
    expect(run.metrics.mapping.retardanceFarFromPi.value).toBe(1);
    const zero = run.metrics.channels.a.zeroOrder.value!;
    expect(zero).toBeGreaterThan(0.49);
    expect(zero).toBeLessThan(0.51);
    const c = n / 2;
    expect(run.farFields.a.total[c * n + c + 8] / run.farFields.a.incidentPower).toBeCloseTo(0.5, 2);
  });

  it('the lean far-field preview equals atoms.ts realizeDevice + simulate.ts simulateDevice (elliptical pair, Gaussian light, demo library)', async () => {
    const n = 64;
    const d = designSchema.parse({
      name: 'cross-check',
      setup: { wavelengthNm: LAMBDA_NM, periodNm: PERIOD_NM, cells: n, illumination: { kind: 'gaussian', waistUm: 10 } },
      polarization: { kind: 'elliptical', psiDeg: 20, chiDeg: 15 },
      channels: {
        a: { terms: [{ kind: 'vortex', charge: 2 }, { kind: 'tilt', thetaXDeg: tiltDeg(6, n) }] },
        b: { terms: [{ kind: 'lens', focalLengthUm: 80 }] },
      },
      simulation: { extraInput: { kind: 'linear', angleDeg: 30 } },
    });
    const demo = demoAtomLibrary();
    const run = await runDesign(d, resources(demo));
    const jones = realizeDevice(run.mapping.atomIndex, run.mapping.theta, demo);
    for (const id of ['a', 'b', 'extra'] as const) {
      const reference = simulateDevice(jones, { grid: run.grid, input: run.inputs[id], analyser: run.analyser, illumination: { kind: 'gaussian', waist: 10e-6 } });
      const mine = run.farFields[id];
      const peak = Math.max(...reference.totalIntensity);
      const compare = (a: ArrayLike<number>, b: ArrayLike<number>) => {
        let worst = 0;
        for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i] - b[i]));
        return worst / peak;
      };
      // Both use the float32 FFT: agreement to a few 1e-7 of the peak; 1e-5 leaves room.
      expect(compare(mine.total, reference.totalIntensity)).toBeLessThan(1e-5);
      expect(compare(mine.analyserA, reference.projections![0].intensity)).toBeLessThan(1e-5);
      expect(compare(mine.analyserB, reference.projections![1].intensity)).toBeLessThan(1e-5);
      expect(compare(mine.x, reference.farField.x.intensity)).toBeLessThan(1e-5);
      expect(compare(mine.y, reference.farField.y.intensity)).toBeLessThan(1e-5);
      expect(mine.incidentPower).toBeCloseTo(reference.incidentPower, 9);
    }
  });

  it('Bessel and vortex-Bessel channels: core and ring radii within 5 % of A&S Table 9.5 values, z_max within 10 % of R/tanβ (Durnin 1987)', async () => {
    const n = 256;
    const d = design({
      cells: n,
      polarization: { kind: 'linear', angleDeg: 0 },
      channels: {
        a: { terms: [{ kind: 'axicon', numericalAperture: 0.15 }] },
        b: { terms: [{ kind: 'axicon', numericalAperture: 0.15 }, { kind: 'vortex', charge: 1 }] },
      },
    });
    const run = await runDesign(d, resources(gridLibrary));
    const lambda = LAMBDA_NM * 1e-9;
    const a = run.channels.a.beam!;
    const b = run.channels.b.beam!;
    // First zero of J₀ 2.404826 and first maximum of J₁ 1.841184 (Abramowitz & Stegun, Table 9.5), written
    // here rather than taken from the engine's helpers: r = j/(k sinβ).
    const k = (2 * Math.PI) / lambda;
    const coreRadius = 2.404826 / (k * 0.15);
    const ringRadius = 1.841184 / (k * 0.15);
    // 1e-6: the table's six decimals.
    expect(Math.abs(a.featureRadius.formula / coreRadius - 1)).toBeLessThan(1e-6);
    expect(Math.abs(a.featureRadius.measured / coreRadius - 1)).toBeLessThan(0.05);
    expect(Math.abs(b.featureRadius.measured / ringRadius - 1)).toBeLessThan(0.05);
    const zMax = ((n * PERIOD_NM * 1e-9) / 2) * Math.sqrt(1 - 0.15 ** 2) / 0.15;
    expect(a.nonDiffractingLength.formula).toBeCloseTo(zMax, 12);
    expect(Math.abs(a.nonDiffractingLength.measured / zMax - 1)).toBeLessThan(0.1);
    expect(a.profileCorrelation).toBeGreaterThan(0.95);
    expect(b.profileCorrelation).toBeGreaterThan(0.95);
    expect(a.slice.length).toBe(a.z.length * n);
    expect(run.metrics.channels.a.coreRadiusMeasured.unit).toBe('m');
    expect(Math.abs(run.metrics.channels.b.ringRadiusFormula.value! / ringRadius - 1)).toBeLessThan(1e-6);
  });

  it('two hologram channels with ideal atoms: images in their windows, crosstalk far below −40 dB, GS error non-increasing (Fienup 1982)', async () => {
    const n = 128;
    const hologram = (name: 'lighthouse' | 'compass-rose', centerX: number, algorithm: 'gs' | 'weighted-gs') => ({
      kind: 'hologram' as const,
      image: { source: 'demo' as const, name },
      window: { units: 'cells' as const, width: 24, centerX, centerY: 0 },
      algorithm,
      iterations: 30,
    });
    const d = design({
      cells: n,
      polarization: { kind: 'circular', handedness: 'right' },
      channels: { a: { terms: [hologram('lighthouse', 30, 'gs')] }, b: { terms: [hologram('compass-rose', -30, 'weighted-gs')] } },
    });
    const run = await runDesign(d, resources(halfWaveLibrary));
    const errors = run.channels.a.retrieval!.fourierError;
    for (let k = 1; k < errors.length; k++) expect(errors[k]).toBeLessThanOrEqual(errors[k - 1] * (1 + 1e-6));
    for (const c of ['a', 'b'] as const) {
      const m = run.metrics.channels[c];
      expect(m.efficiency.value!).toBeGreaterThan(0.6);
      expect(m.correlation.value!).toBeGreaterThan(0.9);
      expect(m.crosstalk.value!).toBeLessThan(-40);
      expect(m.ghostImage.value!).toBeLessThan(-20);
      expect(m.designEfficiency.value!).toBeGreaterThan(m.efficiency.value! - 0.05);
      // 64 equal propagation phases: uniform quantization, so the realized wavefront keeps sinc²(1/64)
      // (Swanson, MIT Lincoln Lab. Tech. Rep. 854 (1989)) and the RMS error reads back as ≈ 64 levels.
      const sinc = Math.sin(Math.PI / 64) / (Math.PI / 64);
      expect(m.wavefrontEfficiency.value!).toBeCloseTo(sinc * sinc, 4);
      expect(Math.abs(m.equivalentPhaseLevels.value! / 64 - 1)).toBeLessThan(0.05);
    }
    expect(run.channels.a.window).toEqual({ x0: 64 + 30 - 12, y0: 64 - 12, width: 24, height: 24 });
    // Every metric carries a unit and a meaning and survives JSON.
    const groups = [run.metrics.run, run.metrics.channels.a, run.metrics.channels.b, run.metrics.extraInput, run.metrics.mapping, run.metrics.designRules];
    for (const group of groups) {
      for (const metric of Object.values(group)) {
        expect(typeof metric.unit).toBe('string');
        expect(metric.meaning.length).toBeGreaterThan(10);
        expect(metric.value === null || Number.isFinite(metric.value)).toBe(true);
      }
    }
    expect(JSON.parse(JSON.stringify(run.metrics))).toEqual(run.metrics);
  });

  it('a Fresnel hologram is judged in its image plane at z (angular spectrum, Goodman §3.10), ideal atoms', async () => {
    const n = 128;
    const d = design({
      cells: n,
      polarization: { kind: 'circular', handedness: 'left' },
      channels: {
        a: {
          terms: [
            {
              kind: 'hologram',
              image: { source: 'demo', name: 'lighthouse' },
              window: { units: 'cells', width: 40, centerX: 0, centerY: 0 },
              fresnelDistanceUm: 150,
              algorithm: 'gs',
              iterations: 30,
            },
          ],
        },
        b: { terms: [{ kind: 'tilt', thetaXDeg: tiltDeg(20, n) }] },
      },
    });
    const run = await runDesign(d, resources(halfWaveLibrary));
    const image = run.channels.a.fresnelImage!;
    expect(image).toHaveLength(n * n);
    const m = run.metrics.channels.a;
    expect(m.efficiency.meaning).toMatch(/image plane at 150 µm/);
    expect(m.efficiency.value!).toBeGreaterThan(0.5);
    expect(m.correlation.value!).toBeGreaterThan(0.8);
    expect(m.crosstalk.value!).toBeLessThan(-40);
    expect(m.ghostImage).toBeUndefined();
  });

  it('a lens channel focuses at f with the square-aperture first zero λf/D (Goodman §4.4.1) and the design peak', async () => {
    const n = 128;
    const d = design({
      cells: n,
      polarization: { kind: 'linear', angleDeg: 0 },
      channels: { a: { terms: [{ kind: 'lens', focalLengthUm: 150 }] }, b: { terms: [{ kind: 'vortex', charge: 1 }] } },
    });
    const run = await runDesign(d, resources(gridLibrary));
    const focus = run.channels.a.focus!;
    const lambda = LAMBDA_NM * 1e-9;
    const side = n * PERIOD_NM * 1e-9;
    expect(focus.squareApertureZero).toBeCloseTo((lambda * 150e-6) / side, 15);
    // Paraxial value; at NA ≈ 0.19 the exact zero is within a few percent of it.
    expect(Math.abs(focus.measuredFirstZero / focus.squareApertureZero - 1)).toBeLessThan(0.08);
    // 32 phase levels per axis: the realized focus keeps most of the ideal peak (sinc²(1/32) ≈ 0.997, Swanson).
    expect(focus.strehlVsDesign).toBeGreaterThan(0.95);
    expect(focus.strehlVsDesign).toBeLessThan(1.01);
    expect(run.channels.b.focus).toBeNull();
    // A linear pair: the circular-light figures of the mapping mean nothing here and are left out.
    expect(run.metrics.mapping.unconvertedCircular).toBeUndefined();
    expect(run.metrics.mapping.retardanceFarFromPi).toBeUndefined();
    expect(run.metrics.mapping.meanError.value).not.toBeNull();
  });

  it('runs an injected retriever with cloneable jobs, reports ordered progress, and cancels between stages', async () => {
    const n = 64;
    const d = design({
      cells: n,
      polarization: { kind: 'linear', angleDeg: 0 },
      channels: {
        a: { terms: [{ kind: 'hologram', image: { source: 'demo', name: 'lighthouse' }, window: { units: 'cells', width: 12, centerX: 16, centerY: 0 }, iterations: 5 }] },
        b: { terms: [{ kind: 'tilt', thetaXDeg: tiltDeg(-10, n) }] },
      },
    });
    const seen: string[] = [];
    const injected: ChannelRetriever = async (jobs, hooks) => {
      seen.push(...jobs.map((j) => j.channel));
      // Jobs must survive a structured clone (worker threads get them that way).
      return retrieveSequentially(jobs.map((j) => structuredClone(j)), hooks);
    };
    const stages: string[] = [];
    const fractions: number[] = [];
    const run = await runDesign(d, resources(gridLibrary, { retrieveChannels: injected }), {
      onProgress: (f, stage) => {
        fractions.push(f);
        if (stages[stages.length - 1] !== stage) stages.push(stage);
      },
    });
    expect(seen).toEqual(['a']);
    const direct = retrievePhase({ ...run.channels.a.plan.hologram!.options });
    expect(Array.from(run.channels.a.phase)).toEqual(Array.from(direct.phase));
    expect(stages).toEqual(['prepare', 'phase retrieval', 'jones synthesis', 'atom mapping', 'simulation', 'design rules']);
    for (let i = 1; i < fractions.length; i++) expect(fractions[i]).toBeGreaterThanOrEqual(fractions[i - 1]);
    expect(fractions[fractions.length - 1]).toBe(1);

    const controller = new AbortController();
    const reason = new Error('stop here');
    const cancelled = runDesign(d, resources(gridLibrary), {
      signal: controller.signal,
      onProgress: (_f, stage) => {
        if (stage === 'atom mapping') controller.abort(reason);
      },
    });
    await expect(cancelled).rejects.toBe(reason);
  });

  it('names the design field when a window leaves the far-field grid or a channel holds two holograms', async () => {
    const n = 64;
    const hologram = { kind: 'hologram' as const, image: { source: 'demo' as const, name: 'lighthouse' as const }, window: { width: 10, centerX: 50 } };
    const outside = design({ cells: n, polarization: { kind: 'linear' }, channels: { a: { terms: [hologram] }, b: { terms: [{ kind: 'vortex', charge: 1 }] } } });
    await expect(runDesign(outside, resources(gridLibrary))).rejects.toThrow(DesignUnitsError);
    await expect(runDesign(outside, resources(gridLibrary))).rejects.toThrow(/^channels\.a\.terms\.0\.window/);
    const inside = { ...hologram, window: { width: 5, centerX: 10 } };
    const twice = design({ cells: n, polarization: { kind: 'linear' }, channels: { a: { terms: [{ kind: 'vortex', charge: 1 }] }, b: { terms: [inside, inside] } } });
    await expect(runDesign(twice, resources(gridLibrary))).rejects.toThrow(/^channels\.b\.terms\.1: a channel holds at most one image hologram/);
    const screenInCells = design({
      cells: n,
      polarization: { kind: 'linear' },
      channels: { a: { terms: [{ ...inside, seenOn: 'flat-screen', window: { units: 'cells', width: 10, centerX: 10 } }] }, b: { terms: [{ kind: 'vortex', charge: 1 }] } },
    });
    await expect(runDesign(screenInCells, resources(gridLibrary))).rejects.toThrow(/^channels\.a\.terms\.0\.window\.units: a picture seen on a flat screen needs the window in 'degrees'/);
    const screenAtDistance = design({
      cells: n,
      polarization: { kind: 'linear' },
      channels: { a: { terms: [{ ...inside, seenOn: 'flat-screen', fresnelDistanceUm: 500, window: { units: 'cells', width: 10, centerX: 10 } }] }, b: { terms: [{ kind: 'vortex', charge: 1 }] } },
    });
    await expect(runDesign(screenAtDistance, resources(gridLibrary))).rejects.toThrow(/^channels\.a\.terms\.0\.seenOn/);
  });

  it('a picture meant for a flat screen looks like the picture there: the realized far field seen on the screen matches it (central projection)', async () => {
    const n = 128;
    const d = design({
      cells: n,
      polarization: { kind: 'circular', handedness: 'right' },
      channels: {
        a: { terms: [{ kind: 'hologram', image: { source: 'demo', name: 'lighthouse' }, window: { units: 'degrees', width: 30, centerX: 22, centerY: 0 }, seenOn: 'flat-screen', iterations: 40 }] },
        b: { terms: [{ kind: 'vortex', charge: 1 }] },
      },
    });
    const run = await runDesign(d, resources(halfWaveLibrary));
    const view = run.channels.a.screenView!;
    expect(view).not.toBeNull();
    expect(run.channels.b.screenView).toBeNull();
    // The picture (square(): bright 8×8 square on a dim 16×16 field) sampled at each screen pixel of its rectangle.
    const picture = square();
    const measured: number[] = [];
    const expected: number[] = [];
    for (const { fx, fy, value } of screenSamples(view)) {
      if (fx < 0.05 || fx > 0.95 || fy < 0.05 || fy > 0.95) continue;
      measured.push(value);
      expected.push(picture.pixels[Math.floor(fy * 16) * 16 + Math.floor(fx * 16)] / 255);
    }
    const mean = (a: number[]) => a.reduce((s, v) => s + v, 0) / a.length;
    const [mm, me] = [mean(measured), mean(expected)];
    let cov = 0;
    let vm = 0;
    let ve = 0;
    measured.forEach((m, i) => {
      cov += (m - mm) * (expected[i] - me);
      vm += (m - mm) ** 2;
      ve += (expected[i] - me) ** 2;
    });
    // Common practice, no published source: a retrieved hologram image correlates above 0.9 with its target.
    expect(cov / Math.sqrt(vm * ve)).toBeGreaterThan(0.9);
    // The far-field target itself is squeezed: its window is narrower in direction cosines than the screen
    // rectangle's width projected at the centre row would suggest (tan spreads faster than sin).
    const window = run.channels.a.window!;
    const deltaU = (LAMBDA_NM / (n * PERIOD_NM));
    expect(window.width * deltaU).toBeLessThan(view.picture.x1 - view.picture.x0);
  });
});
