/**
 * `npm run bench`: the FFT / Gerchberg–Saxton benchmark (bench/fft-bench.ts), then end-to-end runs of
 * design files through the command line's code path, each in a fresh child process (wall time from process
 * start to exit, and the child's peak resident set size):
 * - the twin-image demo (two 1024² channels, weighted GS 200 iterations each, mapping, simulation,
 *   previews, GDSII), with the channels on two worker threads and, for comparison, one after the other;
 * - 2048² designs for peak memory: the twin image with 20 iterations, and a Bessel pair whose x–z slice
 *   needs 4096² zero-padded propagation;
 * - the twin image at 2048² and 4096² with 2 iterations per channel, on one thread as the server's default pool
 *   runs it: peak memory (VmHWM of /proc) and, per stage, its time, the highest resident set seen during it and
 *   the time per cell (mapping, design rules and metrics are linear in the cells: their ns per cell should match
 *   between the two sizes); then the 4096² GDSII written again through the layout worker's code (bench/layout-gds-child.ts):
 *   memory above the two arrays it reads.
 * Every run's peak is printed beside the estimate of shared/optics/run-memory.ts (the calibration check).
 * Targets (issue): demo < 10 s; 2048² < 2 GB peak; 4096² ≤ 6 GB peak; GDSII regeneration ≤ 256 MB above the
 * arrays; two channels in parallel ≥ 1.8× the throughput of one.
 * Then the RCWA per-atom times (bench/rcwa.ts).
 * `npm run bench -- --end-to-end-only` skips the FFT and RCWA benchmarks; `-- --large-only` runs only the 4096²
 * part. The machine is shared: note the load average printed with the results.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main as fftBench } from './fft-bench';
import { main as rcwaBench } from './rcwa';
import { estimateRunMemory } from '../shared/optics/run-memory';
import { designSchema } from '../shared/schemas/design';

const ROOT = fileURLToPath(new URL('../', import.meta.url));
const CHILD = fileURLToPath(new URL('./design-run-child.ts', import.meta.url));
const GDS_CHILD = fileURLToPath(new URL('./layout-gds-child.ts', import.meta.url));
const MIB = 1024 * 1024;

interface ChildReport {
  timings: { inputs: number; engine: number; outputs: number; total: number };
  stages: Record<string, number>;
  /** Highest resident set seen during each stage, KiB. */
  stagePeakKiB: Record<string, number>;
  files: number;
  bytes: number;
  maxRssKiB: number;
}

interface Row {
  label: string;
  wallMs: number;
  report: ChildReport;
  /** shared/optics/run-memory.ts's estimate for the design, MiB (no tile pyramids: the command line paints none). */
  estimateMiB: number;
  cells: number;
}

/** Runs a bench child script in a fresh process; returns the wall time and its last stdout line, parsed. */
function child<T>(label: string, script: string, args: string[]): { wallMs: number; report: T } {
  const t0 = performance.now();
  const result = spawnSync(process.execPath, ['--import', import.meta.resolve('tsx'), script, ...args], { cwd: ROOT, encoding: 'utf8', maxBuffer: 1 << 20 });
  const wallMs = performance.now() - t0;
  if (result.status !== 0) throw new Error(`${label}: the child failed (exit ${result.status}):\n${result.stderr}`);
  return { wallMs, report: JSON.parse(result.stdout.trim().split('\n').pop()!) as T };
}

function runChild(label: string, designPath: string, outDir: string, sequential = false): Row {
  const { wallMs, report } = child<ChildReport>(label, CHILD, [designPath, outDir, ...(sequential ? ['--sequential'] : [])]);
  const design = designSchema.parse(JSON.parse(readFileSync(designPath, 'utf8')));
  return { label, wallMs, report, estimateMiB: estimateRunMemory(design, { tilesMaxSide: 0 }).mib, cells: design.setup.cells ** 2 };
}

const load = () => loadavg().map((v) => v.toFixed(2)).join(', ');

/** Per stage of one run: wall time, highest resident set during it, time per cell. */
function printStages(row: Row) {
  console.log(`\n${row.label}: per stage (load average ${load()}, 2 cores)`);
  console.log('stage (design rules: + metrics) |  time s | ns/cell | peak RSS MiB');
  const names = [...new Set([...Object.keys(row.report.stagePeakKiB), ...Object.keys(row.report.stages)])];
  for (const name of names) {
    const ms = row.report.stages[name];
    const peak = row.report.stagePeakKiB[name];
    const time = ms === undefined ? '' : (ms / 1000).toFixed(2);
    const perCell = ms === undefined ? '' : ((ms * 1e6) / row.cells).toFixed(0);
    console.log(`${name.padEnd(31)} | ${time.padStart(7)} | ${perCell.padStart(7)} | ${peak === undefined ? '' : (peak / 1024).toFixed(0).padStart(12)}`);
  }
}

function derivedDesign(source: string, dir: string, name: string, edit: (design: Record<string, any>) => void): string {
  const design = JSON.parse(readFileSync(join(ROOT, 'demo-assets/designs', source), 'utf8'));
  edit(design);
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(design, null, 2));
  return path;
}

const largeOnly = process.argv.includes('--large-only');
const fft = process.argv.includes('--end-to-end-only') || largeOnly ? null : await fftBench();
if (!process.argv.includes('--end-to-end-only') && !largeOnly) await rcwaBench();
const scratch = mkdtempSync(join(tmpdir(), 'phasewright-bench-'));
try {
  if (largeOnly) large(scratch);
  else endToEnd(scratch);
} finally {
  rmSync(scratch, { recursive: true, force: true });
}

function printRows(rows: Row[]) {
  console.log('run                                                     | wall s | run s | retrieval s | outputs s | peak RSS MiB | estimate MiB | files');
  for (const r of rows) {
    const t = r.report.timings;
    console.log(
      `${r.label.padEnd(55)} | ${(r.wallMs / 1000).toFixed(2).padStart(6)} | ${(t.total / 1000).toFixed(2).padStart(5)} | ${((r.report.stages['phase retrieval'] ?? 0) / 1000).toFixed(2).padStart(11)} | ${(t.outputs / 1000).toFixed(2).padStart(9)} | ${(r.report.maxRssKiB / 1024).toFixed(0).padStart(12)} | ${String(r.estimateMiB).padStart(12)} | ${String(r.report.files).padStart(5)}`,
    );
  }
}

/**
 * The twin image at 2048² and 4096² (2 iterations per channel, one thread as the server's default pool runs a
 * run: the 2048² run is the per-cell reference of the 4096² one), then the 4096² GDSII written again through the
 * layout worker's code. Prints them; returns the 4096² run's row.
 */
function large(scratch: string): Row {
  const [reference, design] = [2048, 4096].map((cells) =>
    derivedDesign('twin-image.json', scratch, `twin-${cells}-2it.json`, (d) => {
      d.setup.cells = cells;
      for (const c of ['a', 'b']) d.channels[c].terms[0].iterations = 2;
    }),
  );
  const out = join(scratch, 'twin-4096');
  console.log(`\nLoad average before the 2048² and 4096² runs: ${load()} (2 cores)`);
  const rows = [runChild('twin image, 2048², 2×2 it, one thread', reference, join(scratch, 'twin-2048-2it'), true), runChild('twin image, 4096², 2×2 it, one thread', design, out, true)];
  printRows(rows);
  for (const r of rows) printStages(r);
  const row = rows[1];
  const gds = child<{ arrayBytes: number; baseKiB: number; withArraysKiB: number; peakKiB: number; gdsBytes: number; ms: number }>('GDSII regeneration', GDS_CHILD, [out]);
  const above = (gds.report.peakKiB * 1024 - gds.report.baseKiB * 1024 - gds.report.arrayBytes) / MIB;
  console.log(
    `\nGDSII of 4096² cells written again through the layout worker's code: ${(gds.report.gdsBytes / MIB).toFixed(0)} MiB in ${(gds.report.ms / 1000).toFixed(1)} s; ` +
      `arrays read ${(gds.report.arrayBytes / MIB).toFixed(0)} MiB, process before them ${(gds.report.baseKiB / 1024).toFixed(0)} MiB, peak ${(gds.report.peakKiB / 1024).toFixed(0)} MiB: ` +
      `${above.toFixed(0)} MiB above the arrays (target ≤ 256 MB) — load average ${load()}`,
  );
  rmSync(out, { recursive: true, force: true });
  return row;
}

/** The end-to-end runs at 1024² and 2048², then the 4096² part, and the targets. */
function endToEnd(scratch: string) {
  const twin = join(ROOT, 'demo-assets/designs/twin-image.json');
  const twin2048 = derivedDesign('twin-image.json', scratch, 'twin-2048.json', (d) => {
    d.setup.cells = 2048;
    for (const c of ['a', 'b']) d.channels[c].terms[0].iterations = 20;
  });
  const bessel2048 = derivedDesign('bessel-vortex.json', scratch, 'bessel-2048.json', (d) => {
    d.setup.cells = 2048;
    d.simulation.beamZUm = { start: 0, end: 3600, steps: 4 };
  });
  console.log(`\nLoad average before the end-to-end runs: ${load()} (2 cores)`);
  const rows = [
    runChild('twin-image demo, 1024², 2×200 it, two worker threads', twin, join(scratch, 'twin')),
    runChild('twin-image demo, 1024², 2×200 it, one thread', twin, join(scratch, 'twin-seq'), true),
    runChild('twin image, 2048², 2×20 it, two worker threads', twin2048, join(scratch, 'twin-2048')),
    runChild('Bessel pair, 2048², 4 x–z planes (4096² propagation)', bessel2048, join(scratch, 'bessel-2048')),
  ];
  console.log('\nEnd to end (child process per run; wall = process start to exit; stages inside the run):');
  printRows(rows);
  const [parallel, sequential, big, beam] = rows;
  printStages(big);
  const huge = large(scratch);
  const retrievalGain = (sequential.report.stages['phase retrieval'] ?? NaN) / (parallel.report.stages['phase retrieval'] ?? NaN);
  const peak2048 = Math.max(big.report.maxRssKiB, beam.report.maxRssKiB) / 1024;
  console.log(`Load average after: ${load()}`);
  console.log('\nTargets:');
  console.log(`  demo end to end < 10 s: run ${(parallel.report.timings.total / 1000).toFixed(2)} s, process ${(parallel.wallMs / 1000).toFixed(2)} s`);
  console.log(`  2048² peak < 2048 MiB: ${peak2048.toFixed(0)} MiB`);
  console.log(`  4096² twin image ≤ 6 GB peak: ${(huge.report.maxRssKiB / 1024).toFixed(0)} MiB`);
  console.log(
    `  two channels in parallel ≥ 1.8× one: FFT bench ×${fft?.parallel ? `${fft.parallel.throughputRatio.toFixed(2)} by wall time, ×${fft.parallel.cpuRatio.toFixed(2)} by CPU time` : 'n/a'}; demo retrieval stage ×${retrievalGain.toFixed(2)} (sequential ${((sequential.report.stages['phase retrieval'] ?? 0) / 1000).toFixed(2)} s / parallel ${((parallel.report.stages['phase retrieval'] ?? 0) / 1000).toFixed(2)} s, worker start-up included)`,
  );
}
