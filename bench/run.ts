/**
 * `npm run bench`: the FFT / Gerchberg–Saxton benchmark (bench/fft-bench.ts), then end-to-end runs of
 * design files through the command line's code path, each in a fresh child process (wall time from process
 * start to exit, and the child's peak resident set size):
 * - the twin-image demo (two 1024² channels, weighted GS 200 iterations each, mapping, simulation,
 *   previews, GDSII), with the channels on two worker threads and, for comparison, one after the other;
 * - 2048² designs for peak memory: the twin image with 20 iterations, and a Bessel pair whose x–z slice
 *   needs 4096² zero-padded propagation.
 * Targets (issue): demo < 10 s; 2048² < 2 GB peak; two channels in parallel ≥ 1.8× the throughput of one.
 * Then the RCWA per-atom times (bench/rcwa.ts).
 * `npm run bench -- --end-to-end-only` skips the FFT and RCWA benchmarks. The machine is shared: note the load average
 * printed with the results.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main as fftBench } from './fft-bench';
import { main as rcwaBench } from './rcwa';

const ROOT = fileURLToPath(new URL('../', import.meta.url));
const CHILD = fileURLToPath(new URL('./design-run-child.ts', import.meta.url));

interface ChildReport {
  timings: { inputs: number; engine: number; outputs: number; total: number };
  stages: Record<string, number>;
  files: number;
  bytes: number;
  maxRssKiB: number;
}

interface Row {
  label: string;
  wallMs: number;
  report: ChildReport;
}

function runChild(label: string, designPath: string, outDir: string, sequential = false): Row {
  const t0 = performance.now();
  const child = spawnSync(process.execPath, ['--import', import.meta.resolve('tsx'), CHILD, designPath, outDir, ...(sequential ? ['--sequential'] : [])], {
    cwd: ROOT,
    encoding: 'utf8',
    maxBuffer: 1 << 20,
  });
  const wallMs = performance.now() - t0;
  if (child.status !== 0) throw new Error(`${label}: the run failed (exit ${child.status}):\n${child.stderr}`);
  const line = child.stdout.trim().split('\n').pop()!;
  return { label, wallMs, report: JSON.parse(line) as ChildReport };
}

function derivedDesign(source: string, dir: string, name: string, edit: (design: Record<string, any>) => void): string {
  const design = JSON.parse(readFileSync(join(ROOT, 'demo-assets/designs', source), 'utf8'));
  edit(design);
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(design, null, 2));
  return path;
}

const fft = process.argv.includes('--end-to-end-only') ? null : await fftBench();
if (!process.argv.includes('--end-to-end-only')) await rcwaBench();
const scratch = mkdtempSync(join(tmpdir(), 'phasewright-bench-'));
try {
  const twin = join(ROOT, 'demo-assets/designs/twin-image.json');
  const twin2048 = derivedDesign('twin-image.json', scratch, 'twin-2048.json', (d) => {
    d.setup.cells = 2048;
    for (const c of ['a', 'b']) d.channels[c].terms[0].iterations = 20;
  });
  const bessel2048 = derivedDesign('bessel-vortex.json', scratch, 'bessel-2048.json', (d) => {
    d.setup.cells = 2048;
    d.simulation.beamZUm = { start: 0, end: 3600, steps: 4 };
  });
  console.log(`\nLoad average before the end-to-end runs: ${loadavg().map((v) => v.toFixed(2)).join(', ')} (2 cores)`);
  const rows = [
    runChild('twin-image demo, 1024², 2×200 it, two worker threads', twin, join(scratch, 'twin')),
    runChild('twin-image demo, 1024², 2×200 it, one thread', twin, join(scratch, 'twin-seq'), true),
    runChild('twin image, 2048², 2×20 it, two worker threads', twin2048, join(scratch, 'twin-2048')),
    runChild('Bessel pair, 2048², 4 x–z planes (4096² propagation)', bessel2048, join(scratch, 'bessel-2048')),
  ];
  console.log('\nEnd to end (child process per run; wall = process start to exit; stages inside the run):');
  console.log('run                                                     | wall s | run s | retrieval s | outputs s | peak RSS MiB | files');
  for (const r of rows) {
    const t = r.report.timings;
    console.log(
      `${r.label.padEnd(55)} | ${(r.wallMs / 1000).toFixed(2).padStart(6)} | ${(t.total / 1000).toFixed(2).padStart(5)} | ${((r.report.stages['phase retrieval'] ?? 0) / 1000).toFixed(2).padStart(11)} | ${(t.outputs / 1000).toFixed(2).padStart(9)} | ${(r.report.maxRssKiB / 1024).toFixed(0).padStart(12)} | ${String(r.report.files).padStart(5)}`,
    );
  }
  const [parallel, sequential, big, beam] = rows;
  const retrievalGain = (sequential.report.stages['phase retrieval'] ?? NaN) / (parallel.report.stages['phase retrieval'] ?? NaN);
  const peak2048 = Math.max(big.report.maxRssKiB, beam.report.maxRssKiB) / 1024;
  console.log(`Load average after: ${loadavg().map((v) => v.toFixed(2)).join(', ')}`);
  console.log('\nTargets:');
  console.log(`  demo end to end < 10 s: run ${(parallel.report.timings.total / 1000).toFixed(2)} s, process ${(parallel.wallMs / 1000).toFixed(2)} s`);
  console.log(`  2048² peak < 2048 MiB: ${peak2048.toFixed(0)} MiB`);
  console.log(
    `  two channels in parallel ≥ 1.8× one: FFT bench ×${fft?.parallel ? `${fft.parallel.throughputRatio.toFixed(2)} by wall time, ×${fft.parallel.cpuRatio.toFixed(2)} by CPU time` : 'n/a'}; demo retrieval stage ×${retrievalGain.toFixed(2)} (sequential ${((sequential.report.stages['phase retrieval'] ?? 0) / 1000).toFixed(2)} s / parallel ${((parallel.report.stages['phase retrieval'] ?? 0) / 1000).toFixed(2)} s, worker start-up included)`,
  );
} finally {
  rmSync(scratch, { recursive: true, force: true });
}
