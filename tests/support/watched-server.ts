/**
 * The real server entry (`node --import tsx server/index.ts`) in a child process on its own database, watched
 * from outside: how long a request takes, whether `/api/health` keeps answering while it is in flight, and how
 * far the process's resident memory rises (Linux /proc: VmHWM after resetting it through clear_refs).
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { freePort } from '../../scripts/lib/free-port';

export interface WatchedServer {
  url: string;
  child: ChildProcess;
  /** Everything the process printed. */
  output(): string;
  stop(): Promise<void>;
}

function exited(child: ChildProcess): Promise<void> {
  return child.exitCode !== null || child.signalCode !== null ? Promise.resolve() : new Promise((resolve) => child.once('exit', () => resolve()));
}

/** Starts the server with `env` (database and mail settings) and waits until /api/health answers. */
export async function startWatchedServer(env: Record<string, string>): Promise<WatchedServer> {
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: { ...process.env, ...env, PORT: String(port), HOST: '127.0.0.1', PUBLIC_URL: url, LOG_LEVEL: 'warn', RUN_WORKERS: '1' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let output = '';
  child.stdout!.on('data', (d: Buffer) => (output += d.toString()));
  child.stderr!.on('data', (d: Buffer) => (output += d.toString()));
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the server exited (${child.exitCode}):\n${output}`);
    try {
      if ((await fetch(`${url}/api/health`)).ok) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`the server did not answer within 60 s:\n${output}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    url,
    child,
    output: () => output,
    async stop() {
      if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
      await exited(child);
    },
  };
}

function statusField(pid: number, field: 'VmRSS' | 'VmHWM'): number {
  const match = new RegExp(`^${field}:\\s+(\\d+) kB`, 'm').exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
  if (!match) throw new Error(`/proc/${pid}/status has no ${field}`);
  return Number(match[1]) * 1024;
}

export interface Observation<T> {
  result: T | null;
  /** Time to the answer, ms; null when none came within the wait. */
  ms: number | null;
  /** Latency of each /api/health request made while the request was in flight, ms (Infinity: no answer). */
  health: number[];
  /** Statuses of those health answers. */
  healthStatus: number[];
  /** Peak resident memory during the request minus resident memory before it, bytes. */
  memoryGrowth: number;
}

/**
 * Sends `request`, polls /api/health one request after another until it has answered (at least once), and
 * measures the memory peak of the server process meanwhile. A request that takes longer than `waitMs` is given
 * up on (result null); a health request that takes longer than `healthWaitMs` counts as Infinity.
 */
export async function observe<T>(server: WatchedServer, request: () => Promise<T>, options: { waitMs?: number; healthWaitMs?: number } = {}): Promise<Observation<T>> {
  const pid = server.child.pid!;
  const waitMs = options.waitMs ?? 10_000;
  const healthWaitMs = options.healthWaitMs ?? 2_000;
  let peakResets = true;
  try {
    writeFileSync(`/proc/${pid}/clear_refs`, '5');
  } catch {
    peakResets = false;
  }
  const before = statusField(pid, 'VmRSS');
  let sampledPeak = before;
  const started = performance.now();
  let ms: number | null = null;
  let result: T | null = null;
  let done = false;
  const answered = request().then((r) => {
    ms = performance.now() - started;
    result = r;
    done = true;
  });
  const giveUp = new Promise<void>((resolve) => setTimeout(resolve, waitMs).unref());
  const health: number[] = [];
  const healthStatus: number[] = [];
  const polling = (async () => {
    do {
      const t0 = performance.now();
      try {
        const res = await fetch(`${server.url}/api/health`, { signal: AbortSignal.timeout(healthWaitMs) });
        await res.arrayBuffer();
        health.push(performance.now() - t0);
        healthStatus.push(res.status);
      } catch {
        health.push(Infinity);
        healthStatus.push(0);
      }
      sampledPeak = Math.max(sampledPeak, statusField(pid, 'VmRSS'));
      await new Promise((r) => setTimeout(r, 20));
    } while (!done && performance.now() - started < waitMs);
  })();
  await Promise.race([answered, giveUp]);
  done = true;
  await polling;
  const peak = peakResets ? Math.max(statusField(pid, 'VmHWM'), sampledPeak) : Math.max(sampledPeak, statusField(pid, 'VmRSS'));
  return { result, ms, health, healthStatus, memoryGrowth: peak - before };
}

/** True when the server answers /api/health within `ms` (200, or 503 from a slow database ping: the process is not stalled). */
export async function healthy(server: WatchedServer, ms = 1_000): Promise<boolean> {
  try {
    const { status } = await fetch(`${server.url}/api/health`, { signal: AbortSignal.timeout(ms) });
    return status === 200 || status === 503;
  } catch {
    return false;
  }
}
