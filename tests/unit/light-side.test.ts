/**
 * The side the light enters: the design's field and its default, what a library records (fields, CSV lines, the
 * builder's source line), the side-mismatch and lattice-diffraction notes the composer and every run give, and
 * one demo atom against RCWA (README "Demo library against RCWA": figures there, only sanity here).
 */
import { describe, expect, it } from 'vitest';
import { atomLibraryToCsv, libraryMedia, parseAtomLibraryCsv } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { demoAgainstRcwa } from '../../shared/optics/demo-rcwa';
import { cellDiffraction, designCellNotes } from '../../shared/optics/library-builder';
import { designSchema } from '../../shared/schemas/design';
import { cellWarnings } from '../../server/cli/design-files';
import twinImage from '../../demo-assets/designs/twin-image.json';

// Malitson 1965 (the fit of materials.ts): fused silica n(633 nm) = 1.4570; λ/n = 434.5 nm.
const demo = demoAtomLibrary();

describe('the design field', () => {
  it('defaults to light through the substrate, the side the demo library and the layout view assume', () => {
    expect(designSchema.parse(twinImage).setup.lightFrom).toBe('substrate');
    const onPillars = designSchema.parse({ ...twinImage, setup: { ...twinImage.setup, lightFrom: 'superstrate' } });
    expect(onPillars.setup.lightFrom).toBe('superstrate');
    const bad = designSchema.safeParse({ ...twinImage, setup: { ...twinImage.setup, lightFrom: 'sideways' } });
    expect(bad.success).toBe(false);
    expect(bad.error!.issues[0].path).toEqual(['setup', 'lightFrom']);
    expect(bad.error!.issues[0].message).toMatch(/'substrate' \(light enters through the substrate\) or 'superstrate' \(onto the pillars\)/);
  });
});

describe('what a library records', () => {
  it('the demo library: light through the substrate, fused silica below, air above, in its source line', () => {
    expect(libraryMedia(demo)).toEqual({ lightFrom: 'substrate', substrateIndex: 1.457, superstrateIndex: 1 });
    expect(demo.source).toMatch(/Computed for light from the substrate side \(substrate n = 1\.4570, superstrate n = 1\.0000\)\. P ≥ λ\/n = 434\.5 nm in the substrate/);
    // A stored library keeps 500 characters of its source (server/components/atom-libraries/atom-library.model.ts).
    expect(demo.source!.length).toBeLessThanOrEqual(500);
    // At P = 400 nm < 434.5 nm the library says nothing about lattice diffraction.
    expect(demoAtomLibrary({ period: 400e-9 }).source).not.toMatch(/diffracts/);
  });

  it('the source line carries the side and the indices through the CSV', () => {
    const read = parseAtomLibraryCsv(atomLibraryToCsv(demo)).library;
    expect(libraryMedia(read)).toEqual(libraryMedia(demo));
  });

  it("reads the builder's words from any source line, and nothing from other text", () => {
    const source = 'RCWA (Fourier modal method, Li 1997 factorization), 11×11 harmonics; light from the superstrate side (substrate n = 1.4570, superstrate n = 1.0000); λ = 633 nm';
    expect(libraryMedia({ source })).toEqual({ lightFrom: 'superstrate', substrateIndex: 1.457, superstrateIndex: 1 });
    expect(libraryMedia({ source: 'our lab; Light from the substrate side' })).toEqual({ lightFrom: 'substrate' });
    expect(libraryMedia({ source: 'measured in our lab' })).toEqual({});
    expect(libraryMedia({ source: null })).toEqual({});
  });
});

describe('notes of a design against its library', () => {
  const cell = { wavelengthNm: 633, periodNm: 450, lightFrom: 'substrate' as const };

  it('the demo scenario: the substrate diffracts the reflected light, the air side does not', () => {
    const notes = designCellNotes(cell, demo);
    expect(notes.sideMismatch).toBeNull();
    expect(notes.mediaUnknown).toBe(false);
    expect(notes.diffraction.map((d) => [d.medium, Number((d.limit * 1e9).toFixed(1))])).toEqual([['incident', 434.5]]);
    expect(notes.diffraction[0].message).toBe(
      'period 450.0 nm ≥ λ/n = 633.0 nm/1.4570 = 434.5 nm in the incident medium (the substrate): the lattice itself diffracts there, so part of the reflected light goes into orders other than the zeroth (the transmitted light is not split by it)',
    );
    // Onto the pillars the substrate is the exit medium; P = 400 nm is below λ/n on both sides.
    expect(designCellNotes({ ...cell, lightFrom: 'superstrate' }, demo).diffraction.map((d) => d.medium)).toEqual(['exit']);
    expect(designCellNotes({ ...cell, periodNm: 400 }, demo).diffraction).toEqual([]);
    // The builder's rule is the same function: TiO₂-like superstrate n = 1.5 at P = 450 nm diffracts on both sides.
    expect(cellDiffraction(450e-9, 633e-9, { lightFrom: 'substrate', substrateIndex: 1.457, superstrateIndex: 1.5 }).map((d) => d.medium)).toEqual(['incident', 'exit']);
  });

  it('names both sides when the library was computed for the other one, and says when the indices are unknown', () => {
    const notes = designCellNotes({ ...cell, lightFrom: 'superstrate' }, demo);
    expect(notes.sideMismatch).toMatch(/^the design has the light entering onto the pillars \(from the superstrate\), the library was computed for light entering through the substrate/);
    expect(designCellNotes(cell, { source: 'lab data' })).toEqual({ sideMismatch: null, diffraction: [], mediaUnknown: true });
  });

  it('every run says the same (the command line and the server share this)', () => {
    const design = designSchema.parse(twinImage);
    expect(cellWarnings(design, demo)).toEqual([`lattice diffraction: ${designCellNotes(cell, demo).diffraction[0].message}`]);
    const onPillars = cellWarnings({ ...design, setup: { ...design.setup, lightFrom: 'superstrate' } }, demo);
    expect(onPillars).toHaveLength(3);
    expect(onPillars[0]).toMatch(/^atom library "Demo Si₃N₄ pillars, 633 nm \(approximate\)": the design has the light entering onto the pillars/);
    expect(onPillars[2]).toMatch(/mirror the layout left–right \(x → −x\) for the mask/);
  });
});

describe('a demo atom against RCWA (sanity only; the figures are in README)', () => {
  it('gives finite values with R + T ≤ 1 and no transmitted orders but the zeroth (air side, P < λ)', () => {
    const atom = demo.atoms.find((a) => a.id === 'w200-l200')!;
    const row = demoAgainstRcwa(demo, atom, 5, 'substrate');
    for (const v of [...Object.values(row.rcwa), ...Object.values(row.difference), ...Object.values(row.x), ...Object.values(row.y)]) expect(Number.isFinite(v)).toBe(true);
    for (const p of [row.x, row.y]) {
      expect(p.zeroOrder + p.otherOrders + p.reflected).toBeLessThanOrEqual(1 + 1e-9);
      expect(p.zeroOrder).toBeGreaterThan(0);
      expect(p.otherOrders).toBeLessThan(1e-12);
    }
    expect(row.demo.tx).toBe(atom.tx);
  });
});
