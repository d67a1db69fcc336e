/**
 * `npm run bench:queue`: runs on the distributed queue (RUN_QUEUE=redis) with one and with two worker
 * processes on this machine.
 *
 * Starts on loopback a throw-away MariaDB seeded with the demo, a private Redis, the mail fake and the real
 * server (`server/index.ts`, which in this mode only enqueues), then worker processes (`server/worker-main.ts`,
 * what `npm run worker` starts), each single-threaded (`RUN_WORKERS=1`, `RUN_HELPER_THREADS=false`). For each worker count:
 * - throughput: eight demo runs (the demo projects' first revisions in turn) queued at once; the wall time from
 *   the first enqueue to the last finish, and runs per minute;
 * - enqueue → start: with every worker idle, a small run (64² cells) is started `--latency-runs` times, one
 *   after the other; the time from the run row's `queuedAt` to its `startedAt` (both written to the database,
 *   the second by the worker when it takes the job).
 * Prints the ratio of the two throughputs (expected ≈ ×1.8 on two cores: one single-threaded worker per core)
 * and the latencies (target under 200 ms), with the load average: the machine may be shared.
 *
 * Options: `--runs N` (8), `--latency-runs N` (10), `--workers 1,2`.
 */
import { availableParallelism } from 'node:os';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../server/db/seed-demo';
import { FINISHED_STATUSES, type RunStatus } from '../shared/schemas/runs';
import { loadAverage, runBenchmark, Session, sleep, startBenchStack, startNodeProcess, stopProcess, type BenchStack } from './lib/stack';

function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}
const RUNS = Number(option('runs', '8'));
const LATENCY_RUNS = Number(option('latency-runs', '10'));
const WORKER_COUNTS = option('workers', '1,2').split(',').map(Number);
if (!(RUNS >= 1 && RUNS <= 40) || !(LATENCY_RUNS >= 1 && LATENCY_RUNS <= 100) || WORKER_COUNTS.some((n) => !(n >= 1 && n <= 8))) {
  throw new RangeError('--runs must be in [1, 40], --latency-runs in [1, 100] and --workers a list of counts in [1, 8]');
}

interface RunRow {
  id: number;
  status: RunStatus;
  queuedAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  error: string | null;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

async function waitForRuns(session: Session, runs: { project: number; id: number }[], timeoutMs: number): Promise<RunRow[]> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const rows = await Promise.all(runs.map(async (r) => (await session.call('GET', `/api/projects/${r.project}/runs/${r.id}`)).run as RunRow));
    if (rows.every((row) => FINISHED_STATUSES.includes(row.status))) {
      const failed = rows.find((row) => row.status !== 'succeeded');
      if (failed) throw new Error(`Run ${failed.id} ended ${failed.status}: ${failed.error ?? ''}`);
      return rows;
    }
    if (Date.now() > deadline) throw new Error(`Runs did not finish within ${timeoutMs / 1000} s`);
    await sleep(100);
  }
}

async function unfinished(session: Session, projects: number[]): Promise<number> {
  const lists = await Promise.all(projects.map((id) => session.call('GET', `/api/projects/${id}/runs`)));
  return lists.flatMap((l) => (l.runs as RunRow[]).filter((r) => !FINISHED_STATUSES.includes(r.status))).length;
}

/** The latest revision number of each demo project the session may run. */
async function demoRevisions(session: Session): Promise<{ project: number; revision: number; name: string }[]> {
  const projects = (await session.call('GET', '/api/projects')).projects as { id: number; name: string; archivedAt?: string | null }[];
  const out = [];
  for (const p of projects.filter((x) => !x.archivedAt)) {
    const revisions = (await session.call('GET', `/api/projects/${p.id}/revisions`)).revisions as { number: number }[];
    if (revisions.length) out.push({ project: p.id, revision: revisions[revisions.length - 1].number, name: p.name });
  }
  return out;
}

interface Measured {
  workers: number;
  wallS: number;
  perMinute: number;
  loadBefore: string;
  loadAfter: string;
  latenciesMs: number[];
}

async function measure(stack: BenchStack, session: Session, workers: number, demos: { project: number; revision: number }[], small: { project: number; revision: number }): Promise<Measured> {
  // Single-threaded workers: one run thread and no helper threads, so each process uses one core.
  const threads = { RUN_WORKERS: '1', RUN_HELPER_THREADS: 'false' };
  const procs = Array.from({ length: workers }, (_, i) => startNodeProcess(`Worker ${workers}.${i + 1}`, 'server/worker-main.ts', { ...stack.env, ...threads }, stack.dataDir));
  try {
    // Let the workers connect and take any leftovers before timing.
    await sleep(3000);
    while (await unfinished(session, [...new Set(demos.map((d) => d.project))])) await sleep(500);

    const loadBefore = loadAverage();
    const t0 = Date.now();
    const started: { project: number; id: number }[] = [];
    for (let i = 0; i < RUNS; i++) {
      const d = demos[i % demos.length];
      const run = (await session.call('POST', `/api/projects/${d.project}/revisions/${d.revision}/runs`)).run as RunRow;
      started.push({ project: d.project, id: run.id });
    }
    const rows = await waitForRuns(session, started, 30 * 60_000);
    const lastFinish = Math.max(...rows.map((r) => Date.parse(r.finishedAt!)));
    const wallS = (lastFinish - t0) / 1000;
    const loadAfter = loadAverage();

    const latenciesMs: number[] = [];
    for (let i = 0; i < LATENCY_RUNS; i++) {
      await sleep(300);
      const run = (await session.call('POST', `/api/projects/${small.project}/revisions/${small.revision}/runs`)).run as RunRow;
      const [row] = await waitForRuns(session, [{ project: small.project, id: run.id }], 120_000);
      latenciesMs.push(Date.parse(row.startedAt!) - Date.parse(row.queuedAt));
    }
    return { workers, wallS, perMinute: (RUNS / wallS) * 60, loadBefore, loadAfter, latenciesMs };
  } finally {
    await Promise.all(procs.map(stopProcess));
  }
}

async function main() {
  // Quotas wide enough for the eight queued runs; the server itself runs nothing in this mode.
  const stack = await startBenchStack('queue', { RUNS_PER_USER: '64', RUNS_PER_PROJECT: '64', RUN_WORKER_NICE: '0' }, { redis: true });
  const owner = DEMO_PEOPLE.find((p) => p.key === 'tomas')!;
  const session = new Session(stack.base);
  await session.signIn(owner.email, DEMO_PASSWORD);

  const demos = await demoRevisions(session);
  if (!demos.length) throw new Error('The demo owner has no project to run');
  // A small design for the enqueue → start latency: the first demo's design at 64² cells and few iterations.
  const source = (await session.call('GET', `/api/projects/${demos[0].project}/revisions/${demos[0].revision}`)).revision.design as Record<string, any>;
  const smallDesign: Record<string, any> = { ...source, setup: { ...source.setup, cells: 64 } };
  for (const channel of Object.values(smallDesign.channels ?? {}) as { terms?: Record<string, any>[] }[]) {
    for (const term of channel.terms ?? []) if (term.iterations) term.iterations = 5;
  }
  const small = { project: demos[0].project, revision: (await session.call('POST', `/api/projects/${demos[0].project}/revisions`, { design: smallDesign, message: 'Queue benchmark: small design' })).revision.number as number };

  console.log(`Server on ${stack.base} (RUN_QUEUE=redis); ${availableParallelism()} cores; ${RUNS} runs of ${demos.map((d) => `“${(d as { name?: string }).name}” r${d.revision}`).join(', ')}`);
  const results: Measured[] = [];
  for (const workers of WORKER_COUNTS) {
    const m = await measure(stack, session, workers, demos, small);
    results.push(m);
    console.log(
      `${workers} single-threaded worker process(es): ${RUNS} runs in ${m.wallS.toFixed(1)} s (${m.perMinute.toFixed(2)} runs/min); ` +
        `enqueue → start median ${median(m.latenciesMs).toFixed(0)} ms, max ${Math.max(...m.latenciesMs)} ms over ${m.latenciesMs.length} runs; ` +
        `load average ${m.loadBefore} → ${m.loadAfter}`,
    );
  }
  console.log('\n| worker processes | runs | wall s | runs/min | ratio to 1 worker | enqueue → start median / max ms | load average before → after |');
  console.log('|---|---|---|---|---|---|---|');
  const one = results.find((r) => r.workers === 1);
  for (const m of results) {
    const ratio = one ? `×${(m.perMinute / one.perMinute).toFixed(2)}` : '—';
    console.log(`| ${m.workers} | ${RUNS} | ${m.wallS.toFixed(1)} | ${m.perMinute.toFixed(2)} | ${ratio} | ${median(m.latenciesMs).toFixed(0)} / ${Math.max(...m.latenciesMs)} | ${m.loadBefore} → ${m.loadAfter} |`);
  }
  console.log('Targets: ≈ ×1.8 with two workers on two cores; enqueue → start under 200 ms.');
}

runBenchmark(main);
