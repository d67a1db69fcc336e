/**
 * RCWA benchmark: time per meta-atom on one thread at 11×11 and 15×15 harmonics, for Si₃N₄ pillars
 * (1200 nm) on fused silica at 633 nm, P = 450 nm (the demo platform), light from the substrate; and the time
 * a 400-atom library at 11×11 would take on two cores from that figure (issue target: under two minutes).
 * Prints figures; asserts nothing. Run: `npx tsx bench/rcwa.ts`, or as part of `npm run bench`.
 */
import { loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';
import { FUSED_SILICA, SILICON_NITRIDE } from '../shared/optics/materials';
import { computeAtom, type RcwaCell } from '../shared/optics/rcwa';

export interface RcwaBenchRow {
  harmonics: number;
  /** Size of each symmetry sector's eigenproblem (the full problem is 2·N²). */
  size: number;
  /** Median time per atom, ms. */
  perAtomMs: number;
}

const ATOMS: [number, number][] = [
  [140e-9, 140e-9],
  [200e-9, 320e-9],
  [300e-9, 160e-9],
];

function cell(width: number, length: number): RcwaCell {
  return {
    period: 450e-9,
    superstrate: { kind: 'constant', n: 1, name: 'air' },
    substrate: { kind: 'sellmeier', material: FUSED_SILICA },
    pillar: { shape: 'rect', width, length, height: 1200e-9, material: { kind: 'sellmeier', material: SILICON_NITRIDE } },
  };
}

export function main(ladder: readonly number[] = [11, 15, 21]): RcwaBenchRow[] {
  console.log(`\nRCWA per atom (one thread; Si₃N₄ 1200 nm on fused silica, 633 nm, P = 450 nm; load ${loadavg().map((v) => v.toFixed(2)).join(', ')}, 2 cores)`);
  console.log('harmonics | eigenproblems (x and y sectors; full size) | per atom s (median of 3 atoms)');
  for (const h of ladder.slice(0, 2)) computeAtom(cell(200e-9, 200e-9), { lambda: 633e-9, harmonics: h, illumination: 'substrate' }); // warm-up (JIT)
  const rows: RcwaBenchRow[] = [];
  for (const h of ladder) {
    const times = ATOMS.map(([w, l]) => {
      const t0 = performance.now();
      computeAtom(cell(w, l), { lambda: 633e-9, harmonics: h, illumination: 'substrate' });
      return performance.now() - t0;
    }).sort((a, b) => a - b);
    const sector = ((h + 1) / 2) ** 2 + ((h - 1) / 2) ** 2;
    const row = { harmonics: h, size: sector, perAtomMs: times[1] };
    rows.push(row);
    console.log(`${`${h}×${h}`.padStart(9)} | ${`2 × ${sector} (${2 * h * h})`.padStart(41)} | ${(row.perAtomMs / 1000).toFixed(2).padStart(6)}`);
  }
  const at11 = rows.find((r) => r.harmonics === 11);
  if (at11) {
    console.log(`400-atom library at 11×11 on two cores (per-atom time × 400 / 2): ${((at11.perAtomMs * 200) / 1000).toFixed(0)} s (target < 120 s)`);
  }
  return rows;
}

if (process.argv[1] === fileURLToPath(import.meta.url)) main();
