import { beforeAll, describe, expect, it } from 'vitest';
import type { AtomLibrary, MetaAtom } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { initFft } from '../../shared/optics/fft';
import { errorHistogram, mappingReport } from '../../shared/optics/mapping-report';
import { conjugateJones, runDesign, type DesignRun } from '../../shared/optics/pipeline';
import { circularState } from '../../shared/optics/polarization';
import { normalizeJones } from '../../shared/optics/simulate';
import type { GrayImage } from '../../shared/optics/target';
import {
  effectiveIndexResponse,
  evaluatePoint,
  nearestAtomResponse,
  reduceSetup,
  responseModelFor,
  runToleranceStudy,
  toleranceContext,
  toleranceSetupOf,
  type AtomResponseModel,
  type ToleranceSetup,
} from '../../shared/optics/tolerance';
import { designSchema, type Design, type DesignInput } from '../../shared/schemas/design';

beforeAll(async () => {
  await initFft();
});

/** Our own test pictures: a filled square and a cross. */
function square(): GrayImage {
  const s = 16;
  return { width: s, height: s, pixels: Uint8Array.from({ length: s * s }, (_, i) => (i % s > 3 && i % s < 12 && i / s > 3 && i / s < 12 ? 255 : 40)) };
}
function cross(): GrayImage {
  const s = 16;
  return { width: s, height: s, pixels: Uint8Array.from({ length: s * s }, (_, i) => (i % s === 7 || i % s === 8 || Math.floor(i / s) === 7 || Math.floor(i / s) === 8 ? 255 : 30)) };
}

const twinImage: DesignInput = {
  name: 'Tolerance twin image',
  setup: { wavelengthNm: 633, periodNm: 450, cells: 64 },
  polarization: { kind: 'circular', handedness: 'left' },
  channels: {
    a: { terms: [{ kind: 'hologram', image: { source: 'demo', name: 'lighthouse' }, window: { units: 'degrees', width: 14, centerX: 16 }, iterations: 10, seed: 3 }] },
    b: { terms: [{ kind: 'hologram', image: { source: 'demo', name: 'compass-rose' }, window: { units: 'degrees', width: 14, centerX: -16 }, iterations: 10, seed: 5 }] },
  },
};

const deflector: DesignInput = {
  name: 'Tolerance deflector',
  setup: { wavelengthNm: 633, periodNm: 450, cells: 64 },
  polarization: { kind: 'linear', angleDeg: 0 },
  channels: { a: { terms: [{ kind: 'tilt', thetaXDeg: 10 }] }, b: { terms: [{ kind: 'vortex', charge: 1 }, { kind: 'tilt', thetaXDeg: -10 }] } },
};

async function runOf(input: DesignInput): Promise<{ design: Design; run: DesignRun; library: AtomLibrary }> {
  const design = designSchema.parse(input);
  const library = demoAtomLibrary({ lambda: 633e-9, period: 450e-9 });
  const run = await runDesign(design, {
    library,
    images: (ref) => (ref.source === 'demo' && ref.name === 'lighthouse' ? square() : cross()),
    phaseMaps: () => {
      throw new Error('no phase maps in this test');
    },
  });
  return { design, run, library };
}

function setupOfRun({ design, run, library }: Awaited<ReturnType<typeof runOf>>) {
  return toleranceSetupOf(
    design,
    { a: run.channels.a.plan, b: run.channels.b.plan },
    { atomIndex: run.mapping.atomIndex, decomposition: run.decomposition, phases: { a: run.channels.a.phase, b: run.channels.b.phase } },
    library,
  );
}

/** Relative difference, with 1e-300 guarding an exact zero. */
const relative = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

describe('tolerance study of a run', () => {
  it('reproduces the run’s own figures exactly at zero bias and zero detuning (hologram channels, demo library)', async () => {
    const source = await runOf(twinImage);
    const setup = setupOfRun(source);
    // The placement rotation is rebuilt by repeating the mapping: it must equal the run's own.
    expect(Array.from(setup.theta)).toEqual(Array.from(source.run.mapping.theta));
    const model = responseModelFor(source.design, source.library);
    expect(model.method).toBe('effective-index');
    const results = await runToleranceStudy(setup, model, { widthBiasNm: [-10, 0, 10], detuneNm: [-20, 0, 20] });
    const zeroBias = results.widthBias.find((p) => p.widthBiasNm === 0)!;
    const zeroDetune = results.detuning.find((p) => p.detuneNm === 0)!;
    for (const point of [zeroBias, zeroDetune]) {
      for (const c of ['a', 'b'] as const) {
        const metrics = source.run.metrics.channels[c];
        expect(results.channels[c].kind).toBe('window');
        expect(relative(point.channels![c].efficiency!, metrics.efficiency.value!)).toBeLessThan(1e-9);
        expect(relative(point.channels![c].crosstalkDb!, metrics.crosstalk.value!)).toBeLessThan(1e-9);
        expect(relative(point.channels![c].zeroOrder!, metrics.zeroOrder.value!)).toBeLessThan(1e-9);
      }
    }
    // Biased points are real re-simulations: they differ from the unbiased device.
    const biased = results.widthBias.find((p) => p.widthBiasNm === 10)!;
    expect(biased.channels!.a.efficiency).not.toBe(zeroBias.channels!.a.efficiency);
    expect(results.detuning).toHaveLength(3);
    expect(results.msPerPoint).toBeGreaterThanOrEqual(0);
  });

  it('reproduces the wavefront efficiency of beam channels exactly at zero bias', async () => {
    const source = await runOf(deflector);
    const setup = setupOfRun(source);
    const results = await runToleranceStudy(setup, responseModelFor(source.design, source.library), { widthBiasNm: [0], detuneNm: [] });
    for (const c of ['a', 'b'] as const) {
      const metrics = source.run.metrics.channels[c];
      expect(results.channels[c].kind).toBe('wavefront');
      expect(relative(results.widthBias[0].channels![c].efficiency!, metrics.wavefrontEfficiency.value!)).toBeLessThan(1e-9);
      expect(relative(results.widthBias[0].channels![c].zeroOrder!, metrics.zeroOrder.value!)).toBeLessThan(1e-9);
    }
  });

  it('a reduced study simulates the central cells and keeps the windows’ directions', async () => {
    const source = await runOf({ ...twinImage, setup: { ...twinImage.setup, cells: 128 } });
    const setup = setupOfRun(source);
    const results = await runToleranceStudy(setup, responseModelFor(source.design, source.library), { widthBiasNm: [0], detuneNm: [], cells: 64 });
    expect(results.cells).toBe(64);
    expect(results.reducedFrom).toBe(128);
    // Window of channel A: direction cosines kept, so its centre moves from p to 32 + (p − 64)/2 (within a pixel).
    const full = setup.channels.a.window!;
    const smaller = reduceSetup(setup, 64).channels.a.window!;
    expect(Math.abs(smaller.x0 + smaller.width / 2 - (32 + (full.x0 + full.width / 2 - 64) / 2))).toBeLessThanOrEqual(1);
    // The crop still sends light into the image window (a quarter of the aperture, a coarser image).
    expect(results.widthBias[0].channels!.a.efficiency!).toBeGreaterThan(0.1);
    expect(() => reduceSetup(setup, 32)).toThrow(RangeError);
  });

  it('recomputes the demo library’s own atoms with the effective-index model (same model as the library)', () => {
    const library = demoAtomLibrary();
    const used = new Uint8Array(library.atoms.length).fill(1);
    // A bias of 1e-21 m forces the recomputation while leaving every size as it is (to far below 1e-12 relative).
    const { atoms } = effectiveIndexResponse(library).atomsAt(1e-21, library.lambda, used);
    atoms.forEach((a, j) => {
      const own = library.atoms[j];
      expect(Math.abs(a.tx - own.tx)).toBeLessThan(1e-9);
      expect(Math.abs(a.ty - own.ty)).toBeLessThan(1e-9);
      expect(Math.abs(Math.cos(a.alphaX - own.alphaX) - 1)).toBeLessThan(1e-9);
      expect(Math.abs(Math.cos(a.alphaY - own.alphaY) - 1)).toBeLessThan(1e-9);
    });
  });

  it('takes the nearest atom of a library by size and says detuning is not available', () => {
    const rect = (w: number): MetaAtom => ({ id: `w${w}`, shape: 'rect', width: w * 1e-9, length: 2 * w * 1e-9, height: 600e-9, period: 450e-9, tx: w / 1000, alphaX: w / 100, ty: 1, alphaY: 0 });
    const library: AtomLibrary = { name: 'sizes', lambda: 633e-9, period: 450e-9, height: 600e-9, material: 'test', approximate: false, atoms: [rect(100), rect(110), rect(120)] };
    const model = nearestAtomResponse(library);
    expect(model.detuningAvailable).toBe(false);
    expect(model.detuningNote).toMatch(/not available/);
    const used = Uint8Array.of(1, 1, 0);
    // (100 + 10, 200 + 10) is nearest to (110, 220): distance 10 nm; (110 + 10, 220 + 10) to (120, 240): 10 nm.
    const { atoms, mismatchM } = model.atomsAt(10e-9, 633e-9, used);
    expect(atoms[0].tx).toBe(0.11);
    expect(atoms[1].tx).toBe(0.12);
    expect(atoms[2].tx).toBe(0.12);
    expect(mismatchM * 1e9).toBeCloseTo(10, 9);
    expect(() => model.atomsAt(0, 643e-9, used)).toThrow(RangeError);
  });
});

/**
 * An ideal geometric-phase grating: every cell holds the same lossless atom (tx = ty = 1, αy = −π), turned by
 * θ = π·ix/8, so 2θ runs through 2π every 8 cells and circular light is deflected by N/8 far-field pixels.
 * The test's response model adds a uniform phase error ε = κΔ to αx, so the retardance is Γ = π + κΔ.
 * Expected (PRODUCT.md "Geometric phase"; Pancharatnam–Berry phase elements, e.g. Bomzon, Biener, Kleiner &
 * Hasman, Opt. Lett. 27, 1141 (2002) — reference from memory): the converted, deflected power fraction is
 * sin²(Γ/2) = cos²(ε/2), the rest cos²(Γ/2) stays in the input state without phase → the zero order.
 */
describe('ideal geometric-phase library', () => {
  const n = 64;
  const kappa = Math.PI / 40; // rad per nm of bias
  const atom: MetaAtom = { id: 'hw', shape: 'rect', width: 100e-9, length: 300e-9, height: 600e-9, period: 450e-9, tx: 1, alphaX: 0, ty: 1, alphaY: -Math.PI };
  const library: AtomLibrary = { name: 'ideal half-wave', lambda: 633e-9, period: 450e-9, height: 600e-9, material: 'test', approximate: false, atoms: [atom] };
  const model: AtomResponseModel = {
    method: 'nearest-atom',
    description: 'test: uniform phase error κΔ on the x axis',
    detuningAvailable: false,
    detuningNote: 'test',
    atomsAt: (biasM) => ({ atoms: [{ ...atom, alphaX: kappa * biasM * 1e9 }], mismatchM: 0 }),
  };
  const theta = Float64Array.from({ length: n * n }, (_, i) => (Math.PI * (i % n)) / 8);
  const a = normalizeJones(circularState('left'));
  const b = normalizeJones(circularState('right'));
  const right = { x0: n / 2 + 2, y0: 0, width: n / 2 - 2, height: n };
  const left = { x0: 0, y0: 0, width: n / 2 - 1, height: n };

  function setup(windowA: typeof right, windowB: typeof right): ToleranceSetup {
    const phase = new Float64Array(n * n);
    return {
      grid: { n, period: 450e-9, lambda: 633e-9 },
      illumination: { kind: 'flat' },
      amplitude: null,
      power: n * n,
      inputs: { a, b },
      analyser: [conjugateJones(a), conjugateJones(b)],
      atomIndex: new Int32Array(n * n),
      theta,
      library,
      channels: { a: { id: 'a', label: 'A', kind: 'window', window: windowA, phase }, b: { id: 'b', label: 'B', kind: 'window', window: windowB, phase } },
      zeroRadius: 1,
    };
  }

  it('zero order follows cos²(Γ/2) and efficiency falls as cos²(ε/2) with the bias', () => {
    // Opposite handednesses are deflected to opposite sides; find input A's side from the unbiased device.
    const probe = evaluatePoint(toleranceContext(setup(right, left)), model, 0, 0);
    const context = toleranceContext(probe.channels!.a.efficiency! > 0.5 ? setup(right, left) : setup(left, right));
    // The far fields are float32 (device-preview.ts), so agreement to 1e-6 absolute is what they can give.
    for (const bias of [-20, -10, -5, 0, 5, 10, 20]) {
      const gamma = Math.PI + kappa * bias;
      const point = evaluatePoint(context, model, bias, 0);
      for (const c of ['a', 'b'] as const) {
        expect(point.channels![c].zeroOrder!).toBeCloseTo(Math.cos(gamma / 2) ** 2, 6);
        expect(point.channels![c].efficiency!).toBeCloseTo(Math.sin(gamma / 2) ** 2, 6);
        expect(point.channels![c].efficiency!).toBeCloseTo(Math.cos((kappa * bias) / 2) ** 2, 6);
      }
    }
  });
});

describe('mapping report', () => {
  it('bins every cell once and counts every cell’s atom once', async () => {
    const { run, library } = await runOf(twinImage);
    const report = run.mappingReport;
    const cells = 64 * 64;
    expect(report.cells).toBe(cells);
    expect(report.errorHistogram.counts.reduce((s, v) => s + v, 0)).toBe(cells);
    expect(report.topAtoms.reduce((s, a) => s + a.cells, 0) + report.otherCells).toBe(cells);
    expect(report.distinctAtoms).toBe(run.metrics.mapping.distinctAtoms.value);
    expect(report.topAtoms.length).toBeLessThanOrEqual(20);
    for (let i = 1; i < report.topAtoms.length; i++) expect(report.topAtoms[i].cells).toBeLessThanOrEqual(report.topAtoms[i - 1].cells);
    expect(report.retardanceThreshold).toBe(Math.PI / 4);
    // Counted here from the stored arrays, as a reader of atom_index.npy would: every atom's cells, the
    // number of distinct atoms, and which atoms are the most used.
    const uses = new Map<number, number>();
    for (const atom of run.mapping.atomIndex) uses.set(atom, (uses.get(atom) ?? 0) + 1);
    expect(report.distinctAtoms).toBe(uses.size);
    for (const top of report.topAtoms) {
      expect(top.cells).toBe(uses.get(top.index));
      expect(top.id).toBe(library.atoms[top.index].id);
    }
    const ranked = [...uses.values()].sort((x, y) => y - x);
    expect(report.topAtoms.map((u) => u.cells)).toEqual(ranked.slice(0, report.topAtoms.length));
    expect(report.otherCells).toBe(ranked.slice(report.topAtoms.length).reduce((s, v) => s + v, 0));
    // Histogram of the per-cell mapping error: equal-width bins from 0 to the largest error, the largest in
    // the last bin, counted here from the cost array.
    const largest = run.mapping.cost.reduce((m, v) => Math.max(m, v), 0);
    const bins = report.errorHistogram.counts.length;
    expect(report.errorHistogram.edges[bins]).toBeCloseTo(largest, 6);
    const counted = new Array<number>(bins).fill(0);
    for (const cost of run.mapping.cost) counted[Math.min(bins - 1, Math.floor((cost / largest) * bins))]++;
    expect(report.errorHistogram.counts).toEqual(counted);
  });

  it('histogram edges and counts of a small example', () => {
    expect(errorHistogram(Float32Array.of(0, 0.5, 1), 2)).toEqual({ edges: [0, 0.5, 1], counts: [1, 2] });
    const report = mappingReport(Int32Array.of(0, 0, 2), new Float32Array(3), { ...demoAtomLibrary(), atoms: demoAtomLibrary().atoms.slice(0, 3) });
    expect(report.topAtoms.map((u) => [u.index, u.cells])).toEqual([
      [0, 2],
      [2, 1],
    ]);
    expect(report.otherCells).toBe(0);
  });
});
