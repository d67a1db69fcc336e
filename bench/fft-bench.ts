/**
 * FFT and Gerchberg–Saxton benchmark of the optics engine against numpy (complex128) and scipy.fft
 * (complex64, workers=1), plus the throughput gain of retrieving two channels on two worker threads.
 *
 * Run: `npx tsx bench/fft-bench.ts [sizes…]` (default 256 512 1024 2048), or import `main` from bench/run.ts.
 * Flop count: 5·N²·log2(N²) per 2-D complex FFT; a GS iteration counts two FFTs.
 * Engine "GS iteration" is the product path (`retrievePhase`, plain GS, Fourier geometry) with a target
 * covering the whole far-field grid, so the amplitude swap runs on every pixel as in the numpy reference;
 * its time is the median interval between progress reports.
 */
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import { fftBackend, fftKernels, getFft2d } from '../shared/optics/fft';
import { retrievePhase } from '../shared/optics/gerchberg-saxton';
import { buildTargetPlane } from '../shared/optics/target';
import type { CellGrid } from '../shared/optics/types';
import { initFftInNode } from '../server/lib/fft-node';

interface ReferenceTimes {
  numpy_fft_ms: number;
  numpy_gs_ms: number;
  scipy_fft_ms: number;
  scipy_gs_ms: number;
}

export interface FftBenchRow {
  n: number;
  fftMs: number;
  fftGflops: number;
  gsMs: number;
  gsGflops: number;
  reference: ReferenceTimes | null;
}

export interface FftBenchResult {
  backend: string;
  rows: FftBenchRow[];
  parallel: { n: number; iterations: number; oneThreadMs: number; twoThreadsMs: number; throughputRatio: number } | null;
  referenceVersions: { numpy: string; scipy: string } | null;
}

const flopsPerFft = (n: number) => 5 * n * n * Math.log2(n * n);

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)];
}

function repetitions(n: number): number {
  return n <= 256 ? 20 : n <= 512 ? 10 : n <= 1024 ? 6 : 3;
}

function benchGrid(n: number): CellGrid {
  // P = λ: the far-field grid spans direction cosines [−0.5, 0.5), all propagating, so a full-grid window fits.
  return { n, period: 633e-9, lambda: 633e-9 };
}

/** Our own full-grid target: a smooth two-level pattern covering every far-field pixel. */
function fullGridTarget(grid: CellGrid) {
  const n = grid.n;
  const pixels = new Float64Array(n * n);
  for (let y = 0; y < n; y++) for (let x = 0; x < n; x++) pixels[y * n + x] = 0.5 + 0.5 * Math.cos((2 * Math.PI * (x + 2 * y)) / n) ** 2;
  return buildTargetPlane(grid, { width: n, height: n, pixels }, { units: 'cells', width: n, height: n, centerX: 0, centerY: 0 });
}

function timeFft(n: number): number {
  const plan = getFft2d(n);
  const data = plan.data;
  for (let i = 0; i < data.length; i++) data[i] = Math.sin(i * 0.618);
  plan.forward();
  const times: number[] = [];
  for (let r = 0; r < repetitions(n); r++) {
    const t0 = performance.now();
    plan.forward();
    times.push(performance.now() - t0);
  }
  return median(times);
}

function timeGsIteration(n: number): number {
  const grid = benchGrid(n);
  const target = fullGridTarget(grid);
  const stamps: number[] = [];
  retrievePhase({ grid, target, iterations: repetitions(n) + 1, seed: 1, onProgress: () => stamps.push(performance.now()) });
  const intervals = stamps.slice(1).map((t, i) => t - stamps[i]);
  return median(intervals);
}

function runReference(sizes: number[]): { versions: { numpy: string; scipy: string }; sizes: Record<string, ReferenceTimes> } | null {
  const script = fileURLToPath(new URL('./numpy_fft_bench.py', import.meta.url));
  try {
    const out = execFileSync('python3', [script, ...sizes.map(String)], { encoding: 'utf8', maxBuffer: 1 << 20 });
    const parsed = JSON.parse(out) as { numpy: string; scipy: string; sizes: Record<string, ReferenceTimes> };
    return { versions: { numpy: parsed.numpy, scipy: parsed.scipy }, sizes: parsed.sizes };
  } catch (error) {
    console.error(`numpy/scipy reference unavailable: ${(error as Error).message}`);
    return null;
  }
}

/** Worker body: retrieve `channels` channels one after the other, return the elapsed milliseconds. */
async function workerMain(): Promise<void> {
  const { n, iterations, channels } = workerData as { n: number; iterations: number; channels: number };
  await initFftInNode();
  const grid = benchGrid(n);
  const target = fullGridTarget(grid);
  retrievePhase({ grid, target, iterations: 1, seed: 1 });
  const t0 = performance.now();
  for (let c = 0; c < channels; c++) retrievePhase({ grid, target, iterations, seed: c + 2 });
  parentPort?.postMessage(performance.now() - t0);
}

function runWorkers(count: number, n: number, iterations: number, channelsEach: number): Promise<number> {
  const jobs = Array.from({ length: count }, () => {
    // Workers load this TypeScript file through tsx's ESM loader API (`--import tsx` does not reach workers here).
    const api = import.meta.resolve('tsx/esm/api');
    const self = JSON.stringify(import.meta.url);
    const source = `import { tsImport } from ${JSON.stringify(api)}; await tsImport(${self}, ${self});`;
    const worker = new Worker(new URL(`data:text/javascript,${encodeURIComponent(source)}`), {
      workerData: { n, iterations, channels: channelsEach },
    });
    return new Promise<number>((resolve, reject) => {
      worker.once('message', (ms: number) => resolve(ms));
      worker.once('error', reject);
    }).finally(() => worker.terminate());
  });
  return Promise.all(jobs).then((ms) => Math.max(...ms));
}

/** Runs the benchmark, prints the table, returns the figures. */
export async function main(sizes: number[] = [256, 512, 1024, 2048]): Promise<FftBenchResult> {
  await initFftInNode();
  const rows: FftBenchRow[] = [];
  for (const n of sizes) {
    const fftMs = timeFft(n);
    const gsMs = timeGsIteration(n);
    rows.push({ n, fftMs, fftGflops: flopsPerFft(n) / fftMs / 1e6, gsMs, gsGflops: (2 * flopsPerFft(n)) / gsMs / 1e6, reference: null });
  }
  const reference = runReference(sizes);
  for (const row of rows) row.reference = reference?.sizes[String(row.n)] ?? null;

  const parallelN = sizes.includes(1024) ? 1024 : sizes[sizes.length - 1];
  const iterations = 10;
  const oneThreadMs = await runWorkers(1, parallelN, iterations, 2);
  const twoThreadsMs = await runWorkers(2, parallelN, iterations, 1);
  const parallel = { n: parallelN, iterations, oneThreadMs, twoThreadsMs, throughputRatio: oneThreadMs / twoThreadsMs };

  const f = (v: number, d = 2) => v.toFixed(d).padStart(8);
  console.log(`Engine FFT backend: ${fftBackend()} (float32${fftKernels() ? ', SIMD kernels' : ''})` + (reference ? `; reference numpy ${reference.versions.numpy} complex128, scipy ${reference.versions.scipy} complex64 workers=1` : ''));
  console.log('   N | FFT ms  GFLOP/s | numpy ms  scipy ms | GS it ms GFLOP/s | numpy ms  scipy ms | GS/numpy GS/scipy');
  for (const r of rows) {
    const ref = r.reference;
    console.log(
      `${String(r.n).padStart(4)} |${f(r.fftMs)}${f(r.fftGflops)} |${ref ? f(ref.numpy_fft_ms) + '  ' + f(ref.scipy_fft_ms) : '      -         -'} |` +
        `${f(r.gsMs)}${f(r.gsGflops)} |${ref ? f(ref.numpy_gs_ms) + '  ' + f(ref.scipy_gs_ms) : '      -         -'} |` +
        `${ref ? f(r.gsMs / ref.numpy_gs_ms) + ' ' + f(r.gsMs / ref.scipy_gs_ms) : '       -        -'}`,
    );
  }
  console.log(
    `Two channels at ${parallelN}², ${iterations} GS iterations each: one thread ${oneThreadMs.toFixed(0)} ms, two worker threads ${twoThreadsMs.toFixed(0)} ms → throughput ×${parallel.throughputRatio.toFixed(2)}`,
  );
  return { backend: fftBackend(), rows, parallel, referenceVersions: reference?.versions ?? null };
}

if (!isMainThread) {
  await workerMain();
} else if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const sizes = process.argv.slice(2).map(Number).filter((v) => v > 0);
  await main(sizes.length ? sizes : undefined);
}
