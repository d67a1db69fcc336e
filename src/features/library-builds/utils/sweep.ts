import type { LibrarySpec } from '../../../../shared/optics/library-builder';
import type { LibraryBuildAtom } from '../../../../shared/schemas/library-builds';

/**
 * The sweep's values as an n × n map, row-major [il][iw]: w (the pillar's x size) along a row, l (its y size)
 * down the rows, so painted upright (colormap.ts `upright`) the picture has w to the right and l up. Cells no
 * atom fills are NaN. Example: sizes [100, 120] and atoms w100-l100, w100-l120, w120-l100, w120-l120 (sweep
 * order) → [v(100,100), v(120,100), v(100,120), v(120,120)].
 */
export function sweepMap(atoms: readonly LibraryBuildAtom[], sizesNm: readonly number[], value: (atom: LibraryBuildAtom) => number): Float64Array {
  const n = sizesNm.length;
  const index = (size: number) => sizesNm.findIndex((s) => Math.abs(s - size) < 1e-6);
  const map = new Float64Array(n * n).fill(NaN);
  for (const atom of atoms) {
    const iw = index(atom.widthNm);
    const il = index(atom.lengthNm);
    if (iw >= 0 && il >= 0) map[il * n + iw] = value(atom);
  }
  return map;
}

/**
 * The sizes a spec's sweep takes, as the builder makes them: from the smallest feature in whole steps up to P
 * minus the smallest gap. Example: 60 nm, step 50 nm, P 450 nm, gap 50 nm → { count: 7, firstNm: 60, lastNm: 360 }.
 */
export function sweepSizes(spec: Pick<LibrarySpec, 'periodNm' | 'sweep'>): { count: number; firstNm: number; lastNm: number } {
  const { minFeatureNm, minGapNm, stepNm } = spec.sweep;
  const count = Math.floor((spec.periodNm - minGapNm - minFeatureNm) / stepNm + 1e-9) + 1;
  return { count, firstNm: minFeatureNm, lastNm: Math.round((minFeatureNm + (count - 1) * stepNm) * 1e4) / 1e4 };
}
