import { describe, expect, it } from 'vitest';
import {
  analyticTermOf,
  cellGridOf,
  designRulesOf,
  DesignUnitsError,
  farFieldWindowOf,
  illuminationOf,
  jonesVectorOf,
  polarizationPairOf,
} from '../../shared/optics/design-units';
import { ellipticalState } from '../../shared/optics/polarization';
import { placeWindow } from '../../shared/optics/target';
import { designSchema, type DesignInput } from '../../shared/schemas/design';

const DEG = Math.PI / 180;

function design(overrides: Partial<DesignInput> = {}) {
  return designSchema.parse({
    name: 'units',
    setup: { wavelengthNm: 633, periodNm: 450, cells: 256 },
    polarization: { kind: 'circular', handedness: 'left' },
    channels: { a: { terms: [{ kind: 'vortex', charge: 1 }] }, b: { terms: [{ kind: 'vortex', charge: -1 }] } },
    ...overrides,
  });
}

describe('design units → engine units', () => {
  it('converts nm to metres for the grid and µm to metres for the Gaussian waist', () => {
    const d = design({ setup: { wavelengthNm: 633, periodNm: 450, cells: 256, illumination: { kind: 'gaussian', waistUm: 40 } } });
    const grid = cellGridOf(d);
    expect(grid.n).toBe(256);
    expect(grid.period / 450e-9).toBeCloseTo(1, 14);
    expect(grid.lambda / 633e-9).toBeCloseTo(1, 14);
    const illumination = illuminationOf(d);
    expect(illumination.kind).toBe('gaussian');
    expect(illumination.kind === 'gaussian' && illumination.waist).toBeCloseTo(40e-6, 18);
    expect(illuminationOf(design())).toEqual({ kind: 'flat' });
  });

  it('builds the pair with polarization.ts conventions: left-circular A = [1, i]/√2, B its partner [1, −i]/√2', () => {
    const pair = polarizationPairOf(design());
    expect(pair.a[0][0]).toBeCloseTo(Math.SQRT1_2, 15);
    expect(pair.a[1][1]).toBeCloseTo(Math.SQRT1_2, 15);
    expect(pair.b[1][1]).toBeCloseTo(-Math.SQRT1_2, 15);
    const linear = polarizationPairOf(design({ polarization: { kind: 'linear', angleDeg: 90 } }));
    expect(linear.a[0][0]).toBeCloseTo(0, 15);
    expect(linear.a[1][0]).toBeCloseTo(1, 15);
  });

  it('turns degrees into radians for single states (Azzam & Bashara λ(ψ, χ))', () => {
    const v = jonesVectorOf({ kind: 'elliptical', psiDeg: 30, chiDeg: -10 });
    expect(v).toEqual(ellipticalState(30 * DEG, -10 * DEG));
    const d45 = jonesVectorOf({ kind: 'linear', angleDeg: 45 });
    expect(d45[0][0]).toBeCloseTo(Math.SQRT1_2, 15);
    expect(d45[1][0]).toBeCloseTo(Math.SQRT1_2, 15);
  });

  it('maps a window in degrees to direction cosines: centre sinθc, width sin(θc + w/2) − sin(θc − w/2)', () => {
    const spec = farFieldWindowOf({ units: 'degrees', width: 10, centerX: 15, centerY: -5 });
    expect(spec.units).toBe('direction-cosine');
    expect(spec.centerX).toBeCloseTo(Math.sin(15 * DEG), 15);
    expect(spec.centerY).toBeCloseTo(Math.sin(-5 * DEG), 15);
    // sin 20° − sin 10° (hand value 0.342020 − 0.173648 = 0.168372)
    expect(spec.width).toBeCloseTo(0.168372, 6);
    expect(spec.height).toBeUndefined();
    const both = farFieldWindowOf({ units: 'degrees', width: 4, height: 6, centerX: 0, centerY: 30 });
    expect(both.height).toBeCloseTo(Math.sin(33 * DEG) - Math.sin(27 * DEG), 15);
  });

  it('places a degree window where the grating equation puts it: u = sinθ, pixel offset u/(λ/(N·P))', () => {
    // N = 256, P = λ: Δu = 1/256. θc = asin(0.25) → 64 px right of the zero order.
    const grid = { n: 256, period: 1e-6, lambda: 1e-6 };
    const spec = farFieldWindowOf({ units: 'degrees', width: 2 * Math.asin(16 / 256) / DEG, centerX: Math.asin(0.25) / DEG, centerY: 0 });
    const window = placeWindow(grid, spec, 1);
    // Window centre within half a pixel of 192 (integer rounding of x0 and width in target.ts).
    expect(Math.abs(window.x0 + (window.width - 1) / 2 - (128 + 64))).toBeLessThanOrEqual(0.5);
    expect(window.width).toBeGreaterThanOrEqual(31);
    expect(window.width).toBeLessThanOrEqual(33);
  });

  it("passes 'cells' and 'direction-cosine' through, and rejects non-cell windows of Fresnel holograms naming the field", () => {
    expect(farFieldWindowOf({ units: 'cells', width: 40, height: 20, centerX: 30, centerY: 0 })).toEqual({ units: 'cells', width: 40, height: 20, centerX: 30, centerY: 0 });
    expect(farFieldWindowOf({ units: 'direction-cosine', width: 0.1, centerX: 0.2, centerY: 0 })).toEqual({ units: 'direction-cosine', width: 0.1, centerX: 0.2, centerY: 0 });
    try {
      farFieldWindowOf({ units: 'degrees', width: 5, centerX: 0, centerY: 0 }, 'fresnel', 'channels.a.terms.0.window');
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(DesignUnitsError);
      expect((error as DesignUnitsError).path).toBe('channels.a.terms.0.window.units');
    }
    expect(() => farFieldWindowOf({ units: 'degrees', width: 40, centerX: 75, centerY: 0 }, 'fourier', 'w')).toThrow(/w\.width/);
  });

  it('converts analytic terms: µm → m, degrees → rad; holograms are not analytic', () => {
    expect(analyticTermOf({ kind: 'lens', focalLengthUm: 500 })).toEqual({ kind: 'lens', focalLength: 500e-6 });
    const tilt = analyticTermOf({ kind: 'tilt', thetaXDeg: 3, thetaYDeg: -2 });
    expect(tilt).toEqual({ kind: 'tilt', thetaX: 3 * DEG, thetaY: -2 * DEG });
    expect(analyticTermOf({ kind: 'axicon', coneHalfAngleDeg: 10 })).toEqual({ kind: 'axicon', coneHalfAngle: 10 * DEG });
    expect(analyticTermOf({ kind: 'axicon', numericalAperture: 0.2 })).toEqual({ kind: 'axicon', numericalAperture: 0.2 });
    expect(analyticTermOf({ kind: 'vortex', charge: -3 })).toEqual({ kind: 'vortex', charge: -3 });
    const map = new Float64Array(4);
    expect(analyticTermOf({ kind: 'custom', phaseMap: { source: 'file', path: 'p.npy' } }, map)).toEqual({ kind: 'custom', phase: map });
    const hologram = designSchema.parse({
      name: 'h',
      setup: { wavelengthNm: 633, periodNm: 450, cells: 64 },
      polarization: { kind: 'linear' },
      channels: {
        a: { terms: [{ kind: 'hologram', image: { source: 'demo', name: 'lighthouse' }, window: { width: 5 } }] },
        b: { terms: [{ kind: 'vortex', charge: 1 }] },
      },
    });
    expect(analyticTermOf(hologram.channels.a.terms[0])).toBeNull();
  });

  it('converts the design rules to metres', () => {
    const rules = designRulesOf(design({ designRules: { minGapNm: 60, minFeatureNm: 90, maxAspectRatio: 8 } }));
    expect(rules.minGap / 60e-9).toBeCloseTo(1, 14);
    expect(rules.minFeature / 90e-9).toBeCloseTo(1, 14);
    expect(rules.maxAspectRatio).toBe(8);
  });
});
