import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { FUSED_SILICA, SILICON_NITRIDE, fusedSilicaIndex, refractiveIndex, siliconNitrideIndex } from '../../shared/optics/materials';
import { PYTHON } from '../support/python';

describe('fused silica (Malitson, JOSA 55, 1205 (1965))', () => {
  it('n(632.8 nm) = 1.45702 — Malitson 1965 table value (from memory)', () => {
    expect(fusedSilicaIndex(632.8e-9)).toBeCloseTo(1.45702, 5);
  });

  it('n(587.6 nm) = 1.45846 — refractiveindex.info evaluation of Malitson’s formula', () => {
    expect(fusedSilicaIndex(587.6e-9)).toBeCloseTo(1.45846, 5);
  });

  it('throws RangeError outside 0.21–3.71 µm, the fit’s stated range', () => {
    expect(() => fusedSilicaIndex(0.2e-6)).toThrow(RangeError);
    expect(() => fusedSilicaIndex(3.8e-6)).toThrow(RangeError);
    expect(() => fusedSilicaIndex(Number.NaN)).toThrow(RangeError);
    expect(fusedSilicaIndex(0.21e-6)).toBeGreaterThan(1.5);
  });
});

describe('silicon nitride (Luke et al., Opt. Lett. 40, 4823 (2015))', () => {
  it('coefficients as listed in the refractiveindex.info database entry Si3N4/Luke (B 3.0249, 40314; C 0.1353406, 1239.842 µm)', () => {
    expect(SILICON_NITRIDE.b).toEqual([3.0249, 40314]);
    expect(SILICON_NITRIDE.c).toEqual([0.1353406, 1239.842]);
    expect(FUSED_SILICA.c).toEqual([0.0684043, 0.1162414, 9.896161]);
  });

  it('matches an independent evaluation in Python of the same published fit; n(1550 nm) ≈ 1.996 (from memory)', () => {
    const wavelengthsUm = [0.4, 0.532, 0.633, 1.0, 1.55, 3.0];
    const script = `
import json, math
def n(l):
    l2 = l*l
    return math.sqrt(1 + 3.0249*l2/(l2 - 0.1353406**2) + 40314*l2/(l2 - 1239.842**2))
print(json.dumps([n(l) for l in ${JSON.stringify(wavelengthsUm)}]))`;
    const expected = JSON.parse(execFileSync(PYTHON, ['-c', script]).toString()) as number[];
    wavelengthsUm.forEach((um, i) => {
      expect(siliconNitrideIndex(um * 1e-6)).toBeCloseTo(expected[i], 12);
    });
    expect(siliconNitrideIndex(1550e-9)).toBeCloseTo(1.996, 3);
  });

  it('is normally dispersive in the visible and throws outside 0.31–5.504 µm', () => {
    expect(siliconNitrideIndex(450e-9)).toBeGreaterThan(siliconNitrideIndex(633e-9));
    expect(() => siliconNitrideIndex(0.3e-6)).toThrow(RangeError);
    expect(() => refractiveIndex(SILICON_NITRIDE, 6e-6)).toThrow(RangeError);
  });
});
