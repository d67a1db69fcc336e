/**
 * `npm run bench:load`: the server under 50 concurrent readers, with and without a design run computing.
 *
 * Starts everything it needs on loopback and stops it again: a throw-away MariaDB (temp data folder, free
 * port), the mail fake, and the real server entry point (`server/index.ts`) in a child process, on the demo
 * data. Waits until the seeded demo runs have finished, signs in as the demo project owner, then drives
 * `--connections` connections for `--duration` seconds with autocannon over
 * - `runs`: `GET /api/projects/1/runs` alone (the figure the issue measured), and
 * - `mix`: projects list, runs list, run detail and notifications in turn on every connection,
 * each once with no run and once while a 1024² demo run computes on the worker pool (a new run is started
 * whenever the last one finishes, at most 20 per phase, and the run still computing at the end is cancelled).
 * Prints requests per second, p50 and p99 latency, errors, timeouts and non-2xx answers, with the load
 * average before and after each phase: the machine may be shared, so read the figures beside it. The CPU time
 * per request of the server's event-loop thread and of MariaDB (from /proc) varies less with the machine's
 * other load than the latencies do (≈ ±20 % rather than several times). autocannon itself runs in this
 * process, on the same cores as the server.
 *
 * Options: `--duration S` (30), `--connections N` (50), `--only me|runs|mix`, `--path /api/…` (drive that one
 * request alone instead, e.g. to find which request of the mix makes its tail), `--no-idle`, `--no-busy`,
 * `--cpu-prof DIR` (the server writes a V8 CPU profile into DIR when it stops; open it in Chrome's DevTools).
 * The server's environment passes through (e.g. `RUN_WORKERS=1 npm run bench:load`).
 * Target (issue 10): p99 under 100 ms and no errors at 50 connections while a run computes.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { availableParallelism } from 'node:os';
import autocannon from 'autocannon';
import mariadb, { type Connection } from 'mariadb';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../server/db/seed-demo';
import { FINISHED_STATUSES, type RunStatus } from '../shared/schemas/runs';
import { loadAverage, runBenchmark, Session, sleep, startBenchStack } from './lib/stack';

const MAX_RUNS_PER_PHASE = 20;

function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}
const DURATION_S = Number(option('duration', '30'));
const CONNECTIONS = Number(option('connections', '50'));
const ONLY = option('only', '');
const ONE_PATH = option('path', '');
const WITH_IDLE = !process.argv.includes('--no-idle');
const WITH_BUSY = !process.argv.includes('--no-busy');
const CPU_PROFILE_DIR = option('cpu-prof', '');
if (!(DURATION_S > 0 && DURATION_S <= 600) || !(CONNECTIONS >= 1 && CONNECTIONS <= 1000)) {
  throw new RangeError('--duration must be in (0, 600] s and --connections in [1, 1000]');
}

const TICK_MS = 10; // USER_HZ is 100 on Linux

/**
 * CPU time (user + system, ms) of a process, or of one of its threads with `tid`, from /proc: a figure per
 * request that depends far less on what else the machine runs than latency does.
 */
function cpuMs(pid: number, tid?: number): number {
  const stat = readFileSync(tid === undefined ? `/proc/${pid}/stat` : `/proc/${pid}/task/${tid}/stat`, 'utf8');
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return (Number(fields[11]) + Number(fields[12])) * TICK_MS;
}

/** MariaDB's count of statements the clients sent (all of them: server, runs, this script). */
async function statementCount(conn: Connection): Promise<number> {
  const rows = (await conn.query("SHOW GLOBAL STATUS LIKE 'Questions'")) as { Value: string }[];
  return Number(rows[0].Value);
}

interface RunRow {
  id: number;
  status: RunStatus;
}

async function unfinishedRuns(session: Session, projectIds: number[]): Promise<RunRow[]> {
  const lists = await Promise.all(projectIds.map((id) => session.call('GET', `/api/projects/${id}/runs`)));
  return lists.flatMap((l) => (l.runs as RunRow[]).filter((r) => !FINISHED_STATUSES.includes(r.status)));
}

/**
 * Keeps one run of revision 1 of project 1 (the 1024² twin-image demo) computing until `stop()`: starts one,
 * waits until it runs, and starts the next whenever it finishes. `stop()` cancels the one still computing
 * and tells how many were started and for what share of the time one was running.
 */
async function keepRunComputing(session: Session) {
  const start = async () => (await session.call('POST', '/api/projects/1/revisions/1/runs')).run.id as number;
  const detailOf = async (id: number) => (await session.call('GET', `/api/projects/1/runs/${id}`)).run as { status: RunStatus; durationMs: number | null; error: string | null };
  const statusOf = async (id: number) => (await detailOf(id)).status;
  const durations: number[] = [];
  let current = await start();
  let started = 1;
  const deadline = Date.now() + 120_000;
  while ((await statusOf(current)) !== 'running') {
    if (Date.now() > deadline) throw new Error(`Run ${current} did not start within 2 minutes`);
    await sleep(200);
  }
  let stopped = false;
  let runningMs = 0;
  // Rejects when a run fails; noticed at the latest by stop().
  const watching = (async () => {
    let last = Date.now();
    while (!stopped) {
      await sleep(500);
      const { status, durationMs, error } = await detailOf(current);
      const now = Date.now();
      if (status === 'running') runningMs += now - last;
      last = now;
      if (FINISHED_STATUSES.includes(status) && !stopped && started < MAX_RUNS_PER_PHASE) {
        if (status !== 'succeeded') throw new Error(`Run ${current} ended ${status}: ${error ?? ''}`);
        if (durationMs !== null) durations.push(durationMs);
        current = await start();
        started += 1;
      }
    }
  })();
  let failure: unknown = null;
  watching.catch((err: unknown) => {
    failure = err;
    stopped = true;
  });
  const since = Date.now();
  return {
    async stop() {
      stopped = true;
      await watching.catch(() => undefined);
      if (failure) throw failure;
      const status = await statusOf(current);
      if (!FINISHED_STATUSES.includes(status)) await session.call('POST', `/api/projects/1/runs/${current}/cancel`);
      return { started, runningShare: runningMs / (Date.now() - since), durations };
    },
  };
}

const MIXES: Record<string, { label: string; paths: string[] }> = {
  // What every signed-in request pays before its own work (session, account): the floor of the others.
  me: { label: 'GET /api/auth/me', paths: ['/api/auth/me'] },
  runs: { label: 'GET /api/projects/1/runs', paths: ['/api/projects/1/runs'] },
  mix: {
    label: 'projects, runs, run 1, notifications',
    paths: ['/api/projects', '/api/projects/1/runs', '/api/projects/1/runs/1', '/api/notifications'],
  },
  ...(ONE_PATH.startsWith('/api/') ? { path: { label: `GET ${ONE_PATH}`, paths: [ONE_PATH] } } : {}),
};

interface PhaseResult {
  mix: string;
  phase: string;
  loadBefore: string;
  loadAfter: string;
  result: autocannon.Result;
  /** CPU ms per answered request: the server's event-loop thread, and MariaDB. */
  cpuPerRequest: { server: number; db: number };
  /** MariaDB statements per answered request (a running run's own statements included). */
  statementsPerRequest: number;
  runs?: { started: number; runningShare: number; durations: number[] };
}

async function drive(base: string, cookie: string, paths: string[]): Promise<autocannon.Result> {
  return autocannon({
    url: base,
    connections: CONNECTIONS,
    duration: DURATION_S,
    headers: { cookie },
    requests: paths.map((p) => ({ method: 'GET', path: p })),
  });
}

function printRow(r: PhaseResult) {
  const { result } = r;
  const finished = r.runs?.durations.length ? `; finished in ${r.runs.durations.map((ms) => `${(ms / 1000).toFixed(1)} s`).join(', ')}` : '';
  const runs = r.runs ? ` Runs started ${r.runs.started}, one computing ${Math.round(r.runs.runningShare * 100)}% of the time${finished}.` : '';
  console.log(
    [
      `${MIXES[r.mix].label} | ${r.phase}`,
      `  ${result.requests.average.toFixed(0)} req/s, p50 ${result.latency.p50} ms, p99 ${result.latency.p99} ms, max ${result.latency.max} ms`,
      `  ${result.requests.total} requests; errors ${result.errors}, timeouts ${result.timeouts}, non-2xx ${result.non2xx}`,
      `  CPU per request: server event loop ${r.cpuPerRequest.server.toFixed(2)} ms, MariaDB ${r.cpuPerRequest.db.toFixed(2)} ms; MariaDB statements per request ${r.statementsPerRequest.toFixed(2)}`,
      `  load average before ${r.loadBefore}, after ${r.loadAfter}.${runs}`,
    ].join('\n'),
  );
}

async function main() {
  const profiling = CPU_PROFILE_DIR ? ['--cpu-prof', `--cpu-prof-dir=${path.resolve(CPU_PROFILE_DIR)}`] : [];
  const { base, config, env, server, dbPid } = await startBenchStack('load', process.env.BENCH_SERVER_NODE_OPTIONS ? { NODE_OPTIONS: process.env.BENCH_SERVER_NODE_OPTIONS } : {}, { serverArgs: profiling });
  const owner = DEMO_PEOPLE.find((p) => p.key === 'tomas')!;
  const session = new Session(base);
  await session.signIn(owner.email, DEMO_PASSWORD);

  console.log(`Server on ${base}; waiting for the seeded demo runs to finish`);
  const waitUntil = Date.now() + 10 * 60_000;
  while ((await unfinishedRuns(session, [1, 2])).length) {
    if (Date.now() > waitUntil) throw new Error('The seeded demo runs did not finish within 10 minutes');
    await sleep(1000);
  }
  const detail = await fetch(`${base}/api/projects/1/runs/1`, { headers: { cookie: session.cookie } });
  console.log(`Run detail of run 1: ${(await detail.arrayBuffer()).byteLength} bytes`);
  const settings = ['RUN_WORKERS', 'RUN_WORKER_NICE', 'SESSION_TOUCH_SECONDS', 'ACCESS_CACHE_SECONDS'] as const;
  console.log(`Server settings: ${settings.map((key) => `${key}=${config[key] ?? '(default)'}`).join(', ')}; ${availableParallelism()} cores`);
  console.log(`Driving ${CONNECTIONS} connections for ${DURATION_S} s per phase (autocannon)\n`);

  const db = await mariadb.createConnection({ host: '127.0.0.1', port: config.DB_PORT, user: config.DB_USER, password: config.DB_PASSWORD, ...(env.DB_SOCKET ? { socketPath: env.DB_SOCKET } : {}) });
  const results: PhaseResult[] = [];
  for (const mix of Object.keys(MIXES)) {
    if (ONE_PATH ? mix !== 'path' : (ONLY && ONLY !== mix) || mix === 'path') continue;
    const phases = [...(WITH_IDLE ? ['no run'] : []), ...(WITH_BUSY ? ['while a run computes'] : [])];
    for (const phase of phases) {
      await sleep(2000);
      const computing = phase === 'no run' ? null : await keepRunComputing(session);
      const loadBefore = loadAverage();
      const cpuBefore = { server: cpuMs(server.pid!, server.pid!), db: cpuMs(dbPid) };
      const statementsBefore = await statementCount(db);
      const result = await drive(base, session.cookie, MIXES[mix].paths);
      const answered = result['1xx'] + result['2xx'] + result['3xx'] + result['4xx'] + result['5xx'];
      const cpuPerRequest = {
        server: (cpuMs(server.pid!, server.pid!) - cpuBefore.server) / answered,
        db: (cpuMs(dbPid) - cpuBefore.db) / answered,
      };
      const statementsPerRequest = ((await statementCount(db)) - statementsBefore) / answered;
      const loadAfter = loadAverage();
      const runs = computing ? await computing.stop() : undefined;
      const row = { mix, phase, loadBefore, loadAfter, result, cpuPerRequest, statementsPerRequest, runs };
      results.push(row);
      printRow(row);
      // Let a cancelled run wind down before the next phase.
      const settle = Date.now() + 60_000;
      while ((await unfinishedRuns(session, [1])).length && Date.now() < settle) await sleep(500);
    }
  }

  console.log('\n| requests | phase | req/s | p50 ms | p99 ms | errors | non-2xx | CPU ms/request server, MariaDB | load average (1, 5, 15 min) before → after |');
  console.log('|---|---|---|---|---|---|---|---|---|');
  for (const r of results) {
    const { result } = r;
    console.log(
      `| ${MIXES[r.mix].label} | ${r.phase} | ${result.requests.average.toFixed(0)} | ${result.latency.p50} | ${result.latency.p99} | ` +
        `${result.errors} | ${result.non2xx} | ${r.cpuPerRequest.server.toFixed(2)}, ${r.cpuPerRequest.db.toFixed(2)} | ${r.loadBefore} → ${r.loadAfter} |`,
    );
  }
  await db.end();
}

runBenchmark(main);
