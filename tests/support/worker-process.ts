/**
 * A real run worker process (`server/worker-main.ts`, what `npm run worker` starts) on a test app's database
 * and Redis queue: the runs it takes and cancels, read from its log lines.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import type { AppConfig } from '../../server/config';

export interface WorkerProcess {
  child: ChildProcess;
  /** Run ids this worker took, in order (its "run taken" log lines). */
  taken: number[];
  /** Tolerance-study ids this worker took, in order ("tolerance study taken"). */
  takenStudies: number[];
  /** When this worker logged "run cancelled", by run id (ms since the epoch). */
  cancelledAt: Map<number, number>;
  /** Every log line's message, in order. */
  messages: string[];
}

/** Starts one worker process with what a worker needs (the database and Redis) and one run thread. */
export function startWorkerProcess(c: AppConfig, env: Record<string, string> = {}): WorkerProcess {
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/worker-main.ts'], {
    stdio: ['ignore', 'pipe', 'inherit'],
    env: {
      PATH: process.env.PATH,
      NODE_ENV: 'test',
      DB_HOST: c.DB_HOST,
      DB_PORT: String(c.DB_PORT),
      DB_NAME: c.DB_NAME,
      DB_USER: c.DB_USER,
      DB_PASSWORD: c.DB_PASSWORD,
      REDIS_URL: c.REDIS_URL,
      REDIS_PREFIX: c.REDIS_PREFIX,
      RUN_WORKERS: '1',
      RUN_WORKER_NICE: '0',
      RUN_STALLED_CHECK_SECONDS: String(c.RUN_STALLED_CHECK_SECONDS),
      RUN_LOCK_SECONDS: String(c.RUN_LOCK_SECONDS),
      LOG_LEVEL: 'info',
      ...env,
    },
  });
  const worker: WorkerProcess = { child, taken: [], takenStudies: [], cancelledAt: new Map(), messages: [] };
  let buffered = '';
  child.stdout!.setEncoding('utf8');
  child.stdout!.on('data', (chunk: string) => {
    buffered += chunk;
    const lines = buffered.split('\n');
    buffered = lines.pop()!;
    for (const line of lines) {
      const entry = JSON.parse(line) as { msg: string; runId?: number; studyId?: number };
      worker.messages.push(entry.msg);
      if (entry.msg === 'run taken') worker.taken.push(entry.runId!);
      if (entry.msg === 'tolerance study taken') worker.takenStudies.push(entry.studyId!);
      if (entry.msg === 'run cancelled') worker.cancelledAt.set(entry.runId!, Date.now());
    }
  });
  return worker;
}

export const workerAlive = (worker: WorkerProcess) => worker.child.exitCode === null && worker.child.signalCode === null;

/** SIGTERM, then waits for the process to exit (a worker finishes or hands back its runs first). */
export async function stopWorkerProcess(worker: WorkerProcess) {
  if (!workerAlive(worker)) return;
  const exited = new Promise((resolve) => worker.child.once('exit', resolve));
  worker.child.kill('SIGTERM');
  await exited;
}
