/**
 * RCWA benchmark: time per meta-atom on one thread at 5×5 … 21×21 harmonics, for Si₃N₄ pillars (1200 nm) on
 * fused silica at 633 nm, P = 450 nm (the demo platform), light from the substrate, beside the cost formula the
 * estimate route uses (server/components/library-builds/library-build-cost.ts); then a 20 × 20 library at 11×11
 * harmonics built on two threads through the library-build job's own task (library-build-task.ts: the sweep on
 * two helper threads, the convergence report, the read-back as atoms.csv), wall time beside the load average
 * (issue target: a 400-atom library at 11×11 in under two minutes on this 2-core machine).
 * Prints figures; asserts nothing. Run: `npx tsx bench/rcwa.ts`, or as part of `npm run bench`.
 */
import { loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';
import { MessageChannel } from 'node:worker_threads';
import type { LibrarySpec } from '../shared/optics/library-builder';
import { secondsPerAtom } from '../server/components/library-builds/library-build-cost';
import libraryBuildTask, { type LibraryBuildMessage } from '../server/components/library-builds/library-build-task';
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

const load = (): string => loadavg().map((v) => v.toFixed(2)).join(', ');

/** The library-build job's task on `lanes` threads, outside the pool (the pool only hands it over). */
export async function librarySweep(lanes = 2): Promise<{ wallMs: number; atoms: number; sweepMsPerAtom: number }> {
  const spec: LibrarySpec = {
    name: 'Benchmark sweep',
    wavelengthNm: 633,
    periodNm: 450,
    heightNm: 1200,
    pillar: 'silicon-nitride',
    substrate: 'fused-silica',
    superstrate: 'air',
    illumination: 'substrate',
    sweep: { minFeatureNm: 40, minGapNm: 30, stepNm: 20 },
    harmonics: 11,
  };
  const { port1, port2 } = new MessageChannel();
  let sweepMsPerAtom = NaN;
  port1.on('message', (m: LibraryBuildMessage) => {
    if (m.type === 'progress') sweepMsPerAtom = m.progress.secondsPerAtom * 1000;
  });
  const t0 = performance.now();
  const result = await libraryBuildTask({ buildId: 0, spec, scope: 'project', name: spec.name, subsetSize: 16, lanes, port: port2 });
  const wallMs = performance.now() - t0;
  port1.close();
  if (!result.ok) throw new Error(`the benchmark build failed: ${result.message}`);
  return { wallMs, atoms: result.result.atoms.length, sweepMsPerAtom };
}

export async function main(ladder: readonly number[] = [5, 9, 11, 15, 21]): Promise<RcwaBenchRow[]> {
  console.log(`\nRCWA per atom (one thread; Si₃N₄ 1200 nm on fused silica, 633 nm, P = 450 nm; load ${load()}, 2 cores)`);
  console.log('harmonics | eigenproblems (x and y sectors; full size) | per atom s (median of 3 atoms) | estimate formula s');
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
    console.log(`${`${h}×${h}`.padStart(9)} | ${`2 × ${sector} (${2 * h * h})`.padStart(41)} | ${(row.perAtomMs / 1000).toFixed(2).padStart(30)} | ${secondsPerAtom(h).toFixed(2).padStart(18)}`);
  }
  const at11 = rows.find((r) => r.harmonics === 11);
  if (at11) {
    console.log(`400-atom library at 11×11 on two cores (per-atom time × 400 / 2): ${((at11.perAtomMs * 200) / 1000).toFixed(0)} s (target < 120 s)`);
  }
  const before = load();
  const sweep = await librarySweep(2);
  console.log(
    `20 × 20 = ${sweep.atoms} atoms at 11×11 on two threads through the library-build job's task (sweep, convergence report, subset, read-back): ` +
      `${(sweep.wallMs / 1000).toFixed(1)} s wall, ${sweep.sweepMsPerAtom.toFixed(0)} ms per atom in the sweep (target < 120 s; load ${before} before, ${load()} after)`,
  );
  return rows;
}

if (process.argv[1] === fileURLToPath(import.meta.url)) await main();
