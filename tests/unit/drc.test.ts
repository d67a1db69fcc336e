import { describe, expect, it } from 'vitest';
import { checkDesignRules, DEFAULT_DESIGN_RULES, rectangleDistance } from '../../shared/optics/drc';
import type { PlacedRect } from '../../shared/optics/drc';
import type { AtomLibrary, MetaAtom } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { mulberry32 } from '../../shared/optics/random';

const P = 450e-9;

function rect(id: string, w: number, l: number, height = 1000e-9): MetaAtom {
  return { id, shape: 'rect', width: w, length: l, height, period: P, tx: 1, alphaX: 0, ty: 1, alphaY: 0 };
}

function lib(atoms: MetaAtom[]): AtomLibrary {
  return { name: 'drc', lambda: 633e-9, period: P, height: 1000e-9, material: 'test', approximate: false, atoms };
}

/** Distance between two rectangles by dense sampling of both outlines (independent brute force). */
function sampledDistance(a: PlacedRect, b: PlacedRect, samples = 200): number {
  const outline = (r: PlacedRect): [number, number][] => {
    const pts: [number, number][] = [];
    const c = Math.cos(r.angle);
    const s = Math.sin(r.angle);
    const corners = [[-1, -1], [1, -1], [1, 1], [-1, 1]].map(([u, v]) => [r.cx + c * u * r.hw - s * v * r.hl, r.cy + s * u * r.hw + c * v * r.hl]);
    for (let e = 0; e < 4; e++) {
      const [x0, y0] = corners[e];
      const [x1, y1] = corners[(e + 1) % 4];
      for (let k = 0; k < samples; k++) pts.push([x0 + ((x1 - x0) * k) / samples, y0 + ((y1 - y0) * k) / samples]);
    }
    return pts;
  };
  const pa = outline(a);
  const pb = outline(b);
  let best = Infinity;
  for (const [x, y] of pa) for (const [u, v] of pb) best = Math.min(best, Math.hypot(x - u, y - v));
  return best;
}

describe('rectangle–rectangle distance', () => {
  it('matches closed forms: parallel faces, corner to corner, corner to face', () => {
    expect(rectangleDistance({ cx: 0, cy: 0, hw: 1, hl: 1, angle: 0 }, { cx: 3, cy: 0, hw: 1, hl: 1, angle: 0 })).toBeCloseTo(1, 14);
    // two squares turned 45°, corners facing: D − 2√2
    const q = Math.PI / 4;
    expect(rectangleDistance({ cx: 0, cy: 0, hw: 1, hl: 1, angle: q }, { cx: 4, cy: 0, hw: 1, hl: 1, angle: q })).toBeCloseTo(4 - 2 * Math.SQRT2, 14);
    // corner of a turned square against a flat face: D − 1 − √2
    expect(rectangleDistance({ cx: 0, cy: 0, hw: 1, hl: 1, angle: 0 }, { cx: 4, cy: 0, hw: 1, hl: 1, angle: q })).toBeCloseTo(3 - Math.SQRT2, 14);
    // overlap → 0
    expect(rectangleDistance({ cx: 0, cy: 0, hw: 1, hl: 2, angle: 0.3 }, { cx: 1, cy: 0.5, hw: 1, hl: 1, angle: 1 })).toBe(0);
  });

  it('agrees with a dense sampling of both outlines for random rotated pairs', () => {
    const rand = mulberry32(21);
    for (let t = 0; t < 30; t++) {
      const a: PlacedRect = { cx: 0, cy: 0, hw: 0.05 + rand() * 0.2, hl: 0.05 + rand() * 0.2, angle: rand() * Math.PI };
      const b: PlacedRect = {
        cx: t % 3 === 2 ? -0.45 : 0.45,
        cy: t % 3 === 0 ? 0 : 0.45,
        hw: 0.05 + rand() * 0.2,
        hl: 0.05 + rand() * 0.2,
        angle: rand() * Math.PI,
      };
      const exact = rectangleDistance(a, b);
      const sampled = sampledDistance(a, b);
      if (exact > 0) {
        expect(exact).toBeLessThanOrEqual(sampled + 1e-12);
        expect(sampled - exact).toBeLessThan(4e-3); // sampling step ≤ 0.5/200 per edge
      } else {
        expect(sampled).toBeLessThan(4e-3);
      }
    }
  });
});

describe('design-rule check', () => {
  it('finds planted gap, feature and aspect-ratio violations with cell coordinates, value and limit', () => {
    const atoms = [
      rect('small', 200e-9, 200e-9),
      rect('wide', 400e-9, 400e-9), // square: placed unrotated, gap 50 nm to a same neighbour
      rect('thin', 80e-9, 300e-9), // feature 80 nm < 100 nm, aspect 12.5 > 10
      rect('bar', 120e-9, 420e-9), // rotated: may come close to a neighbour
    ];
    const library = lib(atoms);
    const n = 6;
    const atomIndex = new Int32Array(n * n); // all 'small'
    const theta = new Float64Array(n * n);
    // Two wide squares side by side at (1,1) and (2,1): gap 450 − 400 = 50 nm.
    atomIndex[1 * n + 1] = 1;
    atomIndex[1 * n + 2] = 1;
    // A thin pillar at (4, 4).
    atomIndex[4 * n + 4] = 2;
    // A bar at (1, 4) turned 45°, with a wide square at (2, 4): a bar corner faces the square's face.
    atomIndex[4 * n + 1] = 3;
    theta[4 * n + 1] = Math.PI / 4;
    atomIndex[4 * n + 2] = 1;
    const rules = { minGap: 70e-9, minFeature: 100e-9, maxAspectRatio: 10 };
    const report = checkDesignRules({ n, period: P, atomIndex, theta, library }, rules);

    const gaps = report.violations.filter((v) => v.kind === 'gap');
    const pairOf = (ix: number, iy: number, jx: number, jy: number) =>
      gaps.find((g) => g.ix === ix && g.iy === iy && g.neighbour!.ix === jx && g.neighbour!.iy === jy);
    const wide = pairOf(1, 1, 2, 1);
    expect(wide?.value).toBeCloseTo(50e-9, 20);
    expect(wide?.limit).toBe(70e-9);
    expect(wide?.atomId).toBe('wide');

    const barGap = rectangleDistance(
      { cx: 0, cy: 0, hw: 60e-9, hl: 210e-9, angle: Math.PI / 4 },
      { cx: P, cy: 0, hw: 200e-9, hl: 200e-9, angle: 0 },
    );
    // corner (60c + 210s, 60s − 210c) at x = 190.9 nm faces the face at x = 250 nm
    expect(barGap).toBeCloseTo(250e-9 - (60e-9 + 210e-9) * Math.SQRT1_2, 20);
    expect(barGap).toBeLessThan(70e-9);
    expect(pairOf(1, 4, 2, 4)?.value).toBeCloseTo(barGap, 20);

    const feature = report.violations.filter((v) => v.kind === 'feature');
    expect(feature).toEqual([{ kind: 'feature', ix: 4, iy: 4, value: 80e-9, limit: 100e-9, atomId: 'thin' }]);
    const aspect = report.violations.filter((v) => v.kind === 'aspect-ratio');
    expect(aspect.length).toBe(1);
    expect(aspect[0].value).toBeCloseTo(12.5, 12);
    expect(report.counts.feature).toBe(1);
    expect(report.counts['aspect-ratio']).toBe(1);
    // Every reported gap is a real one (exact distance of the placed pillars below the limit).
    expect(gaps.length).toBe(2);
    expect(report.counts.gap).toBe(2);
    for (const g of gaps) expect(g.value).toBeLessThan(70e-9);
  });

  it('counts an overlap as gap 0 and caps the list', () => {
    // 445 × 440 nm turned 45°: neighbours overlap (own-frame offset 318 nm < 440 nm on both axes).
    const library = lib([rect('huge', 445e-9, 440e-9)]);
    const n = 8;
    const atomIndex = new Int32Array(n * n);
    const theta = new Float64Array(n * n).fill(Math.PI / 4);
    const report = checkDesignRules({ n, period: P, atomIndex, theta, library }, DEFAULT_DESIGN_RULES, { maxViolations: 5 });
    expect(report.violations.length).toBe(5);
    expect(report.truncated).toBe(true);
    expect(report.counts.gap).toBeGreaterThan(5);
    expect(report.closestGap).toBe(0);
  });

  it('checks wrap-around neighbours only for a periodically tiled layout', () => {
    const library = lib([rect('small', 200e-9, 200e-9), rect('wide', 400e-9, 400e-9)]);
    const n = 5;
    const atomIndex = new Int32Array(n * n);
    atomIndex[2 * n + 0] = 1; // (0, 2)
    atomIndex[2 * n + 4] = 1; // (4, 2): its right neighbour in the next tile is (0, 2)
    atomIndex[0 * n + 1] = 1; // (1, 0)
    atomIndex[4 * n + 1] = 1; // (1, 4): its upper neighbour in the next tile is (1, 0)
    const theta = new Float64Array(n * n);
    const rules = { minGap: 60e-9, minFeature: 100e-9, maxAspectRatio: 10 };
    const single = checkDesignRules({ n, period: P, atomIndex, theta, library }, rules);
    expect(single.counts.gap).toBe(0);
    const tiled = checkDesignRules({ n, period: P, atomIndex, theta, library }, rules, { periodic: true });
    expect(tiled.counts.gap).toBe(2);
    const found = tiled.violations.map((v) => `${v.ix},${v.iy}->${v.neighbour!.ix},${v.neighbour!.iy}`).sort();
    expect(found).toEqual(['1,4->1,0', '4,2->0,2']);
    for (const v of tiled.violations) expect(v.value).toBeCloseTo(50e-9, 20);
  });

  it('passes a clean layout of the demo library at random rotations (its sizes are rotation-safe)', () => {
    const library = demoAtomLibrary();
    const n = 96;
    const rand = mulberry32(12);
    const atomIndex = Int32Array.from({ length: n * n }, () => Math.floor(rand() * library.atoms.length));
    const theta = Float64Array.from({ length: n * n }, () => (rand() - 0.5) * 2 * Math.PI);
    const report = checkDesignRules({ n, period: library.period, atomIndex, theta, library });
    expect(report.counts).toEqual({ gap: 0, feature: 0, 'aspect-ratio': 0 });
    expect(report.violations).toEqual([]);
    // The largest pillars side by side sit exactly at the limit: 450 − 400 = 50 nm is allowed.
    const big = library.atoms.findIndex((a) => a.id === 'w400-l400');
    const edge = checkDesignRules({ n: 2, period: library.period, atomIndex: Int32Array.of(big, big, big, big), theta: new Float64Array(4), library });
    expect(edge.counts.gap).toBe(0);
    expect(edge.closestGap).toBeCloseTo(50e-9, 20);
  });
});
