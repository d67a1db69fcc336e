/**
 * FFT and Gerchberg–Saxton benchmark of the optics engine against numpy (complex128) and scipy.fft
 * (complex64, workers=1), plus the throughput of retrieving two channels on two worker threads against one.
 *
 * Run: `npx tsx bench/fft-bench.ts [sizes…]` (default 512 1024 2048 4096), or import `main` from bench/run.ts.
 * Flop count: 5·N²·log2(N²) per 2-D complex FFT; a GS iteration counts two FFTs.
 * Engine "GS iteration" is the product path (`retrievePhase`, plain GS, Fourier geometry, SIMD kernels) with a
 * target covering the whole far-field grid, so the amplitude swap runs on every pixel as in the numpy reference;
 * its time is the median interval between progress reports.
 * Each size is measured for the engine and then, right after, for numpy/scipy (bench/numpy_fft_bench.py), in
 * turns (five up to 1024², three at 2048², one above), so both see about the same load: the table shows the mean
 * of the turns' medians, and the GS/scipy ratio is the median of the turns' own ratios (each turn's engine and
 * reference measured back to back), printed per turn below the table. Two figures per timing: wall time, and the CPU time of the thread doing the work
 * (engine: process.cpuUsage, one busy thread; reference: time.thread_time). On a shared machine the wall time
 * also counts the time other programs held the cores; the CPU time mostly does not, so the ratios are given
 * for both.
 *
 * Two channels: two worker threads are started and warmed up (FFT plan, kernels and working arrays paged in, one
 * whole channel each, two unmeasured rounds), then, from one common start signal, either one worker retrieves both channels one after the other or each
 * retrieves one. Throughput ratio = time(one thread) / time(two threads), both measured by the main thread from
 * the start signal to the last result. Each worker reports what it saw meanwhile (Linux /proc): CPU time on
 * its core, time spent waiting for a core (run queue), minor page faults, GC pause time, the cores it ran on.
 */
import { execFileSync } from 'node:child_process';
import { readdirSync, readFileSync, readlinkSync } from 'node:fs';
import { loadavg } from 'node:os';
import { PerformanceObserver } from 'node:perf_hooks';
import { fileURLToPath } from 'node:url';
import { Worker, isMainThread, parentPort, workerData } from 'node:worker_threads';
import { fftBackend, fftKernels, getFft2d } from '../shared/optics/fft';
import { retrievePhase } from '../shared/optics/gerchberg-saxton';
import { buildTargetPlane } from '../shared/optics/target';
import type { CellGrid } from '../shared/optics/types';
import { initFftInNode } from '../server/lib/fft-node';

interface Timing {
  wallMs: number;
  cpuMs: number;
}

interface ReferenceTimes {
  numpy_fft_ms: number;
  numpy_fft_cpu_ms: number;
  numpy_gs_ms: number;
  numpy_gs_cpu_ms: number;
  scipy_fft_ms: number;
  scipy_fft_cpu_ms: number;
  scipy_gs_ms: number;
  scipy_gs_cpu_ms: number;
}

export interface FftBenchRow {
  n: number;
  fft: Timing;
  gs: Timing;
  reference: ReferenceTimes | null;
  load: number;
  /** GS iteration engine / scipy complex64 of each turn, by wall and by CPU time. */
  gsScipyTurns: { wall: number[]; cpu: number[] };
}

/** What one worker saw while it retrieved its channels (Linux /proc of its own thread). */
interface ThreadReport {
  /** The worker's thread id. */
  tid: number;
  wallMs: number;
  cpuMs: number;
  runQueueMs: number;
  minorFaults: number;
  gcMs: number;
  migrations: number;
  cores: number[];
}

export interface ParallelRun {
  oneThreadMs: number;
  twoThreadsMs: number;
  throughputRatio: number;
  /** CPU time of the one thread / the larger CPU time of the two: the ratio two free cores would give. */
  cpuRatio: number;
  one: ThreadReport;
  two: ThreadReport[];
  load: number;
  /**
   * CPU time (ms) other threads used while the two retrieved side by side: this process's own (V8's helper
   * threads: concurrent GC and compilation for the workers) and every other process's on the machine.
   */
  othersMs: { process: number; machine: number };
}

export interface ParallelResult {
  n: number;
  iterations: number;
  runs: ParallelRun[];
  /** Median of the runs' ratios. */
  throughputRatio: number;
  cpuRatio: number;
}

export interface FftBenchResult {
  backend: string;
  rows: FftBenchRow[];
  parallel: ParallelResult | null;
  referenceVersions: { numpy: string; scipy: string } | null;
}

const flopsPerFft = (n: number) => 5 * n * n * Math.log2(n * n);

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)];
}

function repetitions(n: number): number {
  return n <= 512 ? 10 : n <= 1024 ? 7 : n <= 2048 ? 5 : 3;
}

/** CPU time of this process in ms (user + system); the benchmarked work runs on this one thread. */
function processCpuMs(): number {
  const usage = process.cpuUsage();
  return (usage.user + usage.system) / 1000;
}

const load1 = () => loadavg()[0];

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

function medianTiming(samples: Timing[]): Timing {
  return { wallMs: median(samples.map((s) => s.wallMs)), cpuMs: median(samples.map((s) => s.cpuMs)) };
}

function timeFft(n: number): Timing {
  const plan = getFft2d(n);
  const data = plan.data;
  for (let i = 0; i < data.length; i++) data[i] = Math.sin(i * 0.618);
  plan.forward();
  const samples: Timing[] = [];
  for (let r = 0; r < repetitions(n); r++) {
    const w0 = performance.now();
    const c0 = processCpuMs();
    plan.forward();
    samples.push({ cpuMs: processCpuMs() - c0, wallMs: performance.now() - w0 });
  }
  return medianTiming(samples);
}

function timeGsIteration(n: number): Timing {
  const grid = benchGrid(n);
  const target = fullGridTarget(grid);
  const stamps: Timing[] = [];
  retrievePhase({ grid, target, iterations: 2, seed: 1 });
  retrievePhase({
    grid,
    target,
    iterations: repetitions(n) + 1,
    seed: 1,
    onProgress: () => stamps.push({ cpuMs: processCpuMs(), wallMs: performance.now() }),
  });
  return medianTiming(stamps.slice(1).map((t, i) => ({ wallMs: t.wallMs - stamps[i].wallMs, cpuMs: t.cpuMs - stamps[i].cpuMs })));
}

function runReference(n: number): { versions: { numpy: string; scipy: string }; times: ReferenceTimes } | null {
  const script = fileURLToPath(new URL('./numpy_fft_bench.py', import.meta.url));
  try {
    const out = execFileSync('python3', [script, String(n)], { encoding: 'utf8', maxBuffer: 1 << 20 });
    const parsed = JSON.parse(out) as { numpy: string; scipy: string; sizes: Record<string, ReferenceTimes> };
    return { versions: { numpy: parsed.numpy, scipy: parsed.scipy }, times: parsed.sizes[String(n)] };
  } catch (error) {
    console.error(`numpy/scipy reference unavailable: ${(error as Error).message}`);
    return null;
  }
}

/** This thread's counters from /proc (Linux): CPU and run-queue time (ns), minor faults, migrations, core. */
function threadCounters(): { cpuNs: number; waitNs: number; minorFaults: number; migrations: number; core: number } {
  const [cpuNs, waitNs] = readFileSync('/proc/thread-self/schedstat', 'utf8').trim().split(/\s+/).map(Number);
  const stat = readFileSync('/proc/thread-self/stat', 'utf8');
  // Fields after the command name in parentheses start at field 3 (state); minflt is field 10, processor 39.
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  const sched = readFileSync('/proc/thread-self/sched', 'utf8');
  const migrations = Number(/se\.nr_migrations\s*:\s*(\d+)/.exec(sched)?.[1] ?? NaN);
  return { cpuNs, waitNs, minorFaults: Number(fields[7]), migrations, core: Number(fields[36]) };
}

/** This thread's id (Linux), from /proc/thread-self → …/task/TID. */
function threadId(): number {
  return Number(readlinkSync('/proc/thread-self').split('/').pop());
}

/** CPU time (ns) of every thread on the machine by "pid/tid", from /proc (threads that end meanwhile drop out). */
function allThreadsCpu(): Map<string, number> {
  const cpu = new Map<string, number>();
  for (const pid of readdirSync('/proc').filter((d) => /^\d+$/.test(d))) {
    let tids: string[];
    try {
      tids = readdirSync(`/proc/${pid}/task`);
    } catch {
      continue;
    }
    for (const tid of tids) {
      try {
        cpu.set(`${pid}/${tid}`, Number(readFileSync(`/proc/${pid}/task/${tid}/schedstat`, 'utf8').split(' ')[0]));
      } catch {
        // ended meanwhile
      }
    }
  }
  return cpu;
}

/**
 * Worker body: loads the engine, warms up (plan, kernels, working arrays paged in, code optimized by one whole
 * channel), says 'ready', then on each
 * { channels } message retrieves that many channels one after the other and answers with its ThreadReport.
 */
async function workerMain(): Promise<void> {
  const { n, iterations } = workerData as { n: number; iterations: number };
  await initFftInNode();
  const grid = benchGrid(n);
  const target = fullGridTarget(grid);
  // A whole channel first: the engine's code reaches its optimized tier here rather than in the first round, where
  // V8's compiler threads would take a core from the other worker.
  retrievePhase({ grid, target, iterations, seed: 1 });
  let gcMs = 0;
  new PerformanceObserver((list) => {
    for (const entry of list.getEntries()) gcMs += entry.duration;
  }).observe({ entryTypes: ['gc'] });
  const port = parentPort!;
  port.on('message', (channels: number) => {
    const cores = new Set<number>();
    const before = threadCounters();
    const gcBefore = gcMs;
    const t0 = performance.now();
    for (let c = 0; c < channels; c++) {
      retrievePhase({ grid, target, iterations, seed: c + 2, onProgress: () => cores.add(threadCounters().core) });
    }
    const wallMs = performance.now() - t0;
    const after = threadCounters();
    const report: ThreadReport = {
      tid: threadId(),
      wallMs,
      cpuMs: (after.cpuNs - before.cpuNs) / 1e6,
      runQueueMs: (after.waitNs - before.waitNs) / 1e6,
      minorFaults: after.minorFaults - before.minorFaults,
      gcMs: gcMs - gcBefore,
      migrations: after.migrations - before.migrations,
      cores: [...cores].sort(),
    };
    port.postMessage(report);
  });
  port.postMessage('ready');
}

function startWorker(n: number, iterations: number): Promise<Worker> {
  // Workers load this TypeScript file through tsx's ESM loader API (`--import tsx` does not reach workers here).
  const api = import.meta.resolve('tsx/esm/api');
  const self = JSON.stringify(import.meta.url);
  const source = `import { tsImport } from ${JSON.stringify(api)}; await tsImport(${self}, ${self});`;
  const worker = new Worker(new URL(`data:text/javascript,${encodeURIComponent(source)}`), { workerData: { n, iterations } });
  return new Promise((resolve, reject) => {
    worker.once('message', () => resolve(worker));
    worker.once('error', reject);
  });
}

/** Sends each worker its channel count at the same moment; resolves with the wall time to the last answer. */
async function race(workers: Worker[], channels: number[]): Promise<{ ms: number; reports: ThreadReport[] }> {
  const t0 = performance.now();
  const reports = await Promise.all(
    workers.map(
      (worker, i) =>
        new Promise<ThreadReport>((resolve, reject) => {
          worker.once('message', resolve);
          worker.once('error', reject);
          worker.postMessage(channels[i]);
        }),
    ),
  );
  return { ms: performance.now() - t0, reports };
}

/** Two channels on one worker thread vs one on each of two, `rounds` times alternating. */
export async function parallelBench(n: number, iterations: number, rounds: number): Promise<ParallelResult> {
  const workers = await Promise.all([startWorker(n, iterations), startWorker(n, iterations)]);
  try {
    // Two rounds unmeasured: for the first seconds of a worker's life V8's helper threads still collect its start-up
    // garbage (memory-reducing GCs), taking 30–80 ms of CPU per round from the other worker's core (printed below
    // as "other threads of this process"); the rounds then measure the steady state.
    for (let r = 0; r < 2; r++) {
      await race([workers[0]], [2]);
      await race(workers, [1, 1]);
    }
    const runs: ParallelRun[] = [];
    for (let r = 0; r < rounds; r++) {
      const load = load1();
      const one = await race([workers[0]], [2]);
      const before = allThreadsCpu();
      const two = await race(workers, [1, 1]);
      const after = allThreadsCpu();
      const retrieving = new Set(two.reports.map((t) => `${process.pid}/${t.tid}`));
      const othersMs = { process: 0, machine: 0 };
      for (const [key, ns] of after) {
        const start = before.get(key);
        if (start === undefined || retrieving.has(key)) continue;
        const ms = (ns - start) / 1e6;
        if (key.startsWith(`${process.pid}/`)) othersMs.process += ms;
        else othersMs.machine += ms;
      }
      const cpuRatio = one.reports[0].cpuMs / Math.max(...two.reports.map((t) => t.cpuMs));
      runs.push({ oneThreadMs: one.ms, twoThreadsMs: two.ms, throughputRatio: one.ms / two.ms, cpuRatio, one: one.reports[0], two: two.reports, load, othersMs });
    }
    return { n, iterations, runs, throughputRatio: median(runs.map((r) => r.throughputRatio)), cpuRatio: median(runs.map((r) => r.cpuRatio)) };
  } finally {
    await Promise.all(workers.map((w) => w.terminate()));
  }
}

function printParallel(p: ParallelResult): void {
  const f = (v: number, d = 0) => v.toFixed(d);
  console.log(`\nTwo channels at ${p.n}², ${p.iterations} GS iterations each (warm workers, common start; per thread: CPU time on its core, waiting for a core, minor faults, GC, core migrations):`);
  for (const [i, r] of p.runs.entries()) {
    const thread = (t: ThreadReport) =>
      `cpu ${f(t.cpuMs)} wait ${f(t.runQueueMs)} flt ${t.minorFaults} gc ${f(t.gcMs, 1)} mig ${t.migrations} cores ${t.cores.join('+')}`;
    console.log(`  round ${i + 1} (load ${r.load.toFixed(2)}): one thread ${f(r.oneThreadMs)} ms [${thread(r.one)}]`);
    console.log(`           two threads ${f(r.twoThreadsMs)} ms [${r.two.map(thread).join(' | ')}] → ×${r.throughputRatio.toFixed(2)}`);
    // CPU time per channel alone vs side by side: above 1 means the two threads slowed each other down
    // (memory bandwidth, shared cache); the wall-time ratio also falls when other programs hold a core.
    const alone = r.one.cpuMs / 2;
    const together = (r.two[0].cpuMs + r.two[1].cpuMs) / 2;
    console.log(`           CPU time per channel side by side / alone: ${(together / alone).toFixed(2)}; CPU-time ratio ×${r.cpuRatio.toFixed(2)}`);
    console.log(`           meanwhile other threads of this process ${f(r.othersMs.process)} ms CPU, other processes ${f(r.othersMs.machine)} ms`);
  }
  console.log(
    `  throughput two threads / one: ×${p.throughputRatio.toFixed(2)} by wall time, ×${p.cpuRatio.toFixed(2)} by CPU time (what two cores free of other work would give) — medians of ${p.runs.length}; target ≥ 1.8`,
  );
}

/** Runs the benchmark, prints the tables, returns the figures. */
export async function main(sizes: number[] = [512, 1024, 2048, 4096]): Promise<FftBenchResult> {
  await initFftInNode();
  const rows: FftBenchRow[] = [];
  let versions: { numpy: string; scipy: string } | null = null;
  for (const n of sizes) {
    const load = load1();
    // Engine and reference take turns, so a burst of load on the shared machine falls on both.
    const turns = n <= 1024 ? 5 : n <= 2048 ? 3 : 1;
    const engine: { fft: Timing; gs: Timing }[] = [];
    const references: ReferenceTimes[] = [];
    for (let t = 0; t < turns; t++) {
      engine.push({ fft: timeFft(n), gs: timeGsIteration(n) });
      const reference = runReference(n);
      versions ??= reference?.versions ?? null;
      if (reference) references.push(reference.times);
    }
    const gs = engine.map((e) => e.gs);
    const gsScipyTurns = {
      wall: references.map((r, t) => gs[t].wallMs / r.scipy_gs_ms),
      cpu: references.map((r, t) => gs[t].cpuMs / r.scipy_gs_cpu_ms),
    };
    const mean = (values: number[]) => values.reduce((a, b) => a + b, 0) / values.length;
    const meanTiming = (timings: Timing[]): Timing => ({ wallMs: mean(timings.map((x) => x.wallMs)), cpuMs: mean(timings.map((x) => x.cpuMs)) });
    const reference = references.length
      ? (Object.fromEntries(Object.keys(references[0]).map((key) => [key, mean(references.map((r) => r[key as keyof ReferenceTimes]))])) as unknown as ReferenceTimes)
      : null;
    rows.push({ n, fft: meanTiming(engine.map((e) => e.fft)), gs: meanTiming(gs), reference, load, gsScipyTurns });
  }

  const f = (v: number, d = 1) => v.toFixed(d).padStart(6);
  const pair = (wall: number, cpu: number) => `${f(wall)} ${f(cpu)}`;
  console.log(
    `Engine FFT backend: ${fftBackend()} (float32${fftKernels() ? ', SIMD kernels' : ''})` +
      (versions ? `; reference numpy ${versions.numpy} complex128, scipy ${versions.scipy} complex64 workers=1` : ''),
  );
  console.log('Times in ms, "wall cpu" (median of each turn, mean of the turns); ratios engine / reference by wall and by CPU time (GS/scipy: median of the turns\' ratios). Load = 1-min load average (2 cores).');
  console.log('   N | load | FFT engine    numpy         scipy        | GS it engine  numpy         scipy        | GS/scipy wall cpu | GS/numpy wall cpu | FFT GFLOP/s');
  for (const r of rows) {
    const ref = r.reference;
    const dash = '     -      -';
    console.log(
      `${String(r.n).padStart(4)} | ${r.load.toFixed(1).padStart(4)} | ${pair(r.fft.wallMs, r.fft.cpuMs)} ${ref ? pair(ref.numpy_fft_ms, ref.numpy_fft_cpu_ms) : dash} ${ref ? pair(ref.scipy_fft_ms, ref.scipy_fft_cpu_ms) : dash} | ` +
        `${pair(r.gs.wallMs, r.gs.cpuMs)} ${ref ? pair(ref.numpy_gs_ms, ref.numpy_gs_cpu_ms) : dash} ${ref ? pair(ref.scipy_gs_ms, ref.scipy_gs_cpu_ms) : dash} | ` +
        `${ref ? `    ${median(r.gsScipyTurns.wall).toFixed(2)} ${median(r.gsScipyTurns.cpu).toFixed(2)}` : '       -    -'} | ` +
        `${ref ? `    ${(r.gs.wallMs / ref.numpy_gs_ms).toFixed(2)} ${(r.gs.cpuMs / ref.numpy_gs_cpu_ms).toFixed(2)}` : '       -    -'} | ${f(flopsPerFft(r.n) / r.fft.cpuMs / 1e6)}`,
    );
  }
  for (const r of rows.filter((row) => row.gsScipyTurns.cpu.length > 1)) {
    const list = (values: number[]) => values.map((v) => v.toFixed(2)).join(' ');
    console.log(`GS/scipy per turn at ${r.n}²: wall ${list(r.gsScipyTurns.wall)}; CPU ${list(r.gsScipyTurns.cpu)}`);
  }
  console.log('Targets: GS iteration ≤ 1.0× scipy complex64 at 1024² and 2048².');

  const parallelN = sizes.includes(1024) ? 1024 : sizes[0];
  const parallel = await parallelBench(parallelN, 20, 4);
  printParallel(parallel);
  return { backend: fftBackend(), rows, parallel, referenceVersions: versions };
}

if (!isMainThread) {
  await workerMain();
} else if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const sizes = process.argv.slice(2).map(Number).filter((v) => v > 0);
  await main(sizes.length ? sizes : undefined);
}
