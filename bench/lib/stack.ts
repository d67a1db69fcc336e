/**
 * What the server benchmarks start and stop on loopback: a throw-away MariaDB (temp data folder, free port)
 * seeded with the demo data, the mail fake, optionally a private Redis, and the real server entry point
 * (`server/index.ts`) in a child process; plus a signed-in API session and clean-up on every way out.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { chmodSync, createWriteStream, existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadConfig, type AppConfig } from '../../server/config';
import { createSequelize, migrateUp } from '../../server/db/database';
import { seedDemo } from '../../server/db/seed-demo';
import { freePort } from '../../scripts/lib/free-port';
import { startMailFake } from '../../scripts/lib/mail-fake';
import { startMariaDb } from '../../scripts/lib/mariadb';
import { startRedis } from '../../scripts/lib/redis';
import { waitForHealth } from '../../scripts/lib/wait-for-health';

export const ROOT = fileURLToPath(new URL('../../', import.meta.url));
export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
export const loadAverage = () => readFileSync('/proc/loadavg', 'utf8').split(' ').slice(0, 3).join(' ');

// ---------------------------------------------------------------------------------------------------------
// Clean-up

const cleanups: (() => Promise<void>)[] = [];
let cleaning: Promise<void> | null = null;
/** Logs printed when something fails (their folder is deleted on the way out). */
const logs: { label: string; file: string }[] = [];

/** Runs `step` on the way out (last registered first). */
export function onCleanUp(step: () => Promise<void>) {
  cleanups.push(step);
}

export function cleanUp(): Promise<void> {
  cleaning ??= (async () => {
    for (const step of cleanups.reverse()) await step().catch((err: unknown) => console.error(err));
  })();
  return cleaning;
}

function printLogTails() {
  for (const { label, file } of logs) {
    if (existsSync(file)) console.error(`${label}'s last lines:\n${readFileSync(file, 'utf8').split('\n').slice(-20).join('\n')}`);
  }
}

/** Runs a benchmark's `main`, stopping whatever it started however it ends (signal, error, success). */
export function runBenchmark(main: () => Promise<void>) {
  for (const signal of ['SIGINT', 'SIGTERM'] as const) {
    process.on(signal, () => void cleanUp().then(() => process.exit(130)));
  }
  // Whatever goes wrong, stop what was started: MariaDB, the mail fake and the server would otherwise outlive us.
  for (const event of ['uncaughtException', 'unhandledRejection'] as const) {
    process.on(event, (err: unknown) => {
      console.error(err instanceof Error ? err.stack : err);
      printLogTails();
      void cleanUp().then(() => process.exit(1));
    });
  }
  main()
    .then(() => cleanUp())
    .then(() => process.exit(0))
    .catch(async (err: unknown) => {
      console.error(err instanceof Error ? err.stack : err);
      printLogTails();
      await cleanUp();
      process.exit(1);
    });
}

// ---------------------------------------------------------------------------------------------------------
// Processes

/** Starts `node --import tsx <entry>` in ROOT with `env`, its output in `<dataDir>/<label>.log`; stopped on clean-up. */
export function startNodeProcess(label: string, entry: string, env: Record<string, string>, dataDir: string, nodeArgs: string[] = []): ChildProcess {
  const file = path.join(process.env.BENCH_LOG_DIR ?? dataDir, `${label.replace(/\W+/g, "-")}.log`);
  logs.push({ label, file });
  const log = createWriteStream(file);
  const child = spawn(process.execPath, [...nodeArgs, '--import', 'tsx', entry], {
    cwd: ROOT,
    env: { ...process.env, ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
  });
  child.stdout!.pipe(log);
  child.stderr!.pipe(log);
  onCleanUp(() => stopProcess(child));
  return child;
}

/** SIGTERM, then SIGKILL after 15 s. */
export async function stopProcess(child: ChildProcess) {
  if (child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise((r) => child.once('exit', r));
  child.kill('SIGTERM');
  await Promise.race([exited, sleep(15_000)]);
  if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
}

export interface BenchStack {
  base: string;
  config: AppConfig;
  /** What the server was started with (also what a worker process needs). */
  env: Record<string, string>;
  server: ChildProcess;
  dataDir: string;
  dbPid: number;
}

/**
 * MariaDB seeded with the demo, the mail fake, Redis when `redis`, and the server with `extraEnv` (e.g.
 * RUN_QUEUE=redis, quotas). `serverArgs` go to node (e.g. --cpu-prof).
 */
export async function startBenchStack(name: string, extraEnv: Record<string, string> = {}, options: { redis?: boolean; serverArgs?: string[] } = {}): Promise<BenchStack> {
  const dataDir = mkdtempSync(path.join(tmpdir(), `pw-${name}-`));
  // Reachable by the database's own system user (the data folder inside is closed to others by the start code).
  chmodSync(dataDir, 0o755);
  onCleanUp(async () => rmSync(dataDir, { recursive: true, force: true }));
  const [dbPort, smtpPort, mailWebPort, appPort] = [await freePort(), await freePort(), await freePort(), await freePort()];
  const env: Record<string, string> = {
    NODE_ENV: 'production',
    HOST: '127.0.0.1',
    PORT: String(appPort),
    PUBLIC_URL: `http://127.0.0.1:${appPort}`,
    DB_PORT: String(dbPort),
    DB_NAME: `phasewright_${name}`,
    DB_USER: `phasewright_${name}`,
    DB_PASSWORD: `phasewright-${name}-password`,
    SMTP_PORT: String(smtpPort),
    BCRYPT_COST: '4',
    LOG_LEVEL: process.env.LOG_LEVEL ?? 'warn',
    CLIENT_DIST: path.join(dataDir, 'no-client'),
    ...extraEnv,
  };
  if (options.redis) {
    const redis = await startRedis({ port: await freePort(), dataDir: null });
    onCleanUp(() => redis.stop());
    env.REDIS_URL = redis.url;
    env.RUN_QUEUE = 'redis';
  }
  const config = loadConfig({ ...process.env, ...env });

  console.log(`Starting MariaDB on 127.0.0.1:${dbPort}${options.redis ? ', Redis' : ''} and the mail fake (data in ${dataDir})`);
  const db = await startMariaDb({ dataDir: path.join(dataDir, 'mariadb'), port: dbPort, user: config.DB_USER, password: config.DB_PASSWORD, databases: [config.DB_NAME] });
  onCleanUp(() => db.stop());
  if (process.env.BENCH_DB_TCP !== 'true') env.DB_SOCKET = db.socket;
  const mail = await startMailFake(smtpPort, mailWebPort, ROOT);
  onCleanUp(() => mail.stop());

  const sequelize = createSequelize(config);
  await migrateUp(sequelize);
  await seedDemo(sequelize, config.BCRYPT_COST);
  await sequelize.close();

  const server = startNodeProcess('The server', 'server/index.ts', env, dataDir, options.serverArgs);
  const base = config.publicUrl;
  await waitForHealth(`${base}/api/health`, server);
  const dbPid = Number(readFileSync(path.join(dataDir, 'mariadb', 'run', 'mariadbd.pid'), 'utf8'));
  return { base, config, env, server, dataDir, dbPid };
}

// ---------------------------------------------------------------------------------------------------------
// A signed-in session

/** A signed-in session of the real server: its cookies (session, and the anonymous CSRF cookie) and CSRF token. */
export class Session {
  readonly cookies = new Map<string, string>();
  csrfToken = '';
  constructor(readonly base: string) {}

  get cookie(): string {
    return [...this.cookies].map(([name, value]) => `${name}=${value}`).join('; ');
  }

  async call(method: string, url: string, body?: object) {
    const res = await fetch(this.base + url, {
      method,
      headers: { cookie: this.cookie, 'content-type': 'application/json', 'x-csrf-token': this.csrfToken },
      body: body ? JSON.stringify(body) : undefined,
    });
    for (const setCookie of res.headers.getSetCookie()) {
      const [pair] = setCookie.split(';');
      const at = pair.indexOf('=');
      this.cookies.set(pair.slice(0, at), pair.slice(at + 1));
    }
    const json = (await res.json()) as Record<string, any>;
    if (!res.ok) throw new Error(`${method} ${url}: ${res.status} ${JSON.stringify(json)}`);
    if (typeof json.csrfToken === 'string') this.csrfToken = json.csrfToken;
    return json;
  }

  async signIn(email: string, password: string) {
    await this.call('GET', '/api/auth/csrf');
    await this.call('POST', '/api/auth/sign-in', { email, password });
  }
}
