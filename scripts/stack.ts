/**
 * Runs the whole local stack for `npm start` (and `npm run dev` with --dev): private MariaDB on loopback,
 * the mail fake, migrations, demo seed, client build, and the server. With RUN_QUEUE=redis also a private
 * Redis on loopback (append-only file in REDIS_DATA_DIR) and RUN_WORKER_PROCESSES worker processes. Ctrl-C stops everything it started:
 * children run in their own process groups (detached) so a terminal Ctrl-C reaches only this script, which
 * then stops them in order — server, mail fake, MariaDB.
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { availableParallelism } from 'node:os';
import { isLoopback, loadConfig, seedsDemo } from '../server/config';
import { createSequelize, migrateUp } from '../server/db/database';
import { DEMO_PASSWORD, DEMO_PEOPLE, seedDemo } from '../server/db/seed-demo';
import { startMailFake } from './lib/mail-fake';
import { startMariaDb } from './lib/mariadb';
import { startRedis } from './lib/redis';
import { waitForHealth } from './lib/wait-for-health';

const dev = process.argv.includes('--dev');
const say = (line: string) => console.log(`› ${line}`);

const stoppers: (() => Promise<void>)[] = [];
const children: ChildProcess[] = [];
let stopping = false;

async function stopAll(code: number) {
  if (stopping) return;
  stopping = true;
  say('Stopping…');
  for (const child of children) if (child.exitCode === null) child.kill('SIGTERM');
  await Promise.all(children.map((c) => (c.exitCode === null ? new Promise((r) => c.once('exit', r)) : null)));
  for (const stop of stoppers.reverse()) await stop().catch(() => undefined);
  say('Stopped.');
  process.exit(code);
}
process.on('SIGINT', () => void stopAll(0));
process.on('SIGTERM', () => void stopAll(0));

async function main() {
  const config = loadConfig();
  const mailWebPort = Number(process.env.MAIL_WEB_PORT ?? 1080);

  say(`Starting MariaDB on 127.0.0.1:${config.DB_PORT} (data in ${config.DB_DATA_DIR})`);
  const db = await startMariaDb({
    dataDir: config.DB_DATA_DIR,
    port: config.DB_PORT,
    user: config.DB_USER,
    password: config.DB_PASSWORD,
    databases: [config.DB_NAME],
  });
  stoppers.push(() => db.stop());
  // The server and local workers reach the private MariaDB through its unix socket (cheaper than loopback TCP).
  if (!process.env.DB_SOCKET) process.env.DB_SOCKET = db.socket;

  say(`Starting the mail fake: SMTP 127.0.0.1:${config.SMTP_PORT}, inbox http://127.0.0.1:${mailWebPort}`);
  const mail = await startMailFake(config.SMTP_PORT, mailWebPort);
  stoppers.push(() => mail.stop());

  const redisMode = config.RUN_QUEUE === 'redis';
  if (redisMode) {
    const redisUrl = new URL(config.REDIS_URL);
    if (isLoopback(redisUrl.hostname)) {
      const port = Number(redisUrl.port || 6379);
      say(`Starting Redis on 127.0.0.1:${port} (append-only file in ${config.REDIS_DATA_DIR})`);
      const redis = await startRedis({ port, dataDir: config.REDIS_DATA_DIR, password: redisUrl.password ? decodeURIComponent(redisUrl.password) : undefined });
      stoppers.push(() => redis.stop());
    } else {
      say(`Using the Redis at ${redisUrl.hostname}:${redisUrl.port || 6379} (REDIS_URL is not loopback: not started here)`);
    }
  }

  const sequelize = createSequelize(config);
  const applied = await migrateUp(sequelize);
  say(applied.length ? `Applied migrations: ${applied.join(', ')}` : 'Database schema is up to date');
  const demo = seedsDemo(config);
  if (demo) {
    const { created } = await seedDemo(sequelize, config.BCRYPT_COST);
    say(created.length ? `Seeded demo data: ${created.join(', ')}` : 'Demo data already present; kept as it is');
  } else {
    const why = config.SEED_DEMO === false ? 'SEED_DEMO=false' : `${config.HOST} is not loopback and their password is published; SEED_DEMO=true seeds them anyway`;
    say(`Demo accounts not seeded (${why})`);
  }
  await sequelize.close();

  if (!dev) {
    say('Building the client');
    const build = spawnSync('node_modules/.bin/vite', ['build', '--logLevel', 'warn'], { stdio: 'inherit' });
    if (build.status !== 0) throw new Error('The client build failed (see above)');
  }

  // The IPC channel lets the server notice if this script dies without stopping it (it then shuts down too).
  const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    stdio: ['inherit', 'inherit', 'inherit', 'ipc'],
    detached: true,
    env: { ...process.env, NODE_ENV: dev ? 'development' : 'production' },
  });
  children.push(server);
  server.on('exit', (code) => {
    if (!stopping) {
      console.error(`The server exited (code ${code}); stopping the rest.`);
      void stopAll(code || 1);
    }
  });
  if (redisMode) {
    // The cores shared among the local workers (one thread each per core), unless RUN_WORKERS says otherwise.
    const threads = config.RUN_WORKERS ?? Math.max(1, Math.floor(availableParallelism() / Math.max(1, config.RUN_WORKER_PROCESSES)));
    say(`Starting ${config.RUN_WORKER_PROCESSES} run worker process(es) of ${threads} thread(s) (RUN_WORKER_PROCESSES, RUN_WORKERS)`);
    for (let i = 0; i < config.RUN_WORKER_PROCESSES; i++) {
      const worker = spawn(process.execPath, ['--import', 'tsx', 'server/worker-main.ts'], {
        stdio: ['inherit', 'inherit', 'inherit', 'ipc'],
        detached: true,
        env: { ...process.env, NODE_ENV: dev ? 'development' : 'production', RUN_WORKERS: String(threads) },
      });
      children.push(worker);
      worker.on('exit', (code) => {
        if (!stopping) console.error(`A run worker process exited (code ${code}); its runs go to the other workers.`);
      });
    }
  }
  let url = config.publicUrl;
  if (dev) {
    const vite = spawn('node_modules/.bin/vite', ['--host', '127.0.0.1', '--port', '5173', '--strictPort'], {
      stdio: 'inherit',
      detached: true,
    });
    children.push(vite);
    url = 'http://127.0.0.1:5173';
  }
  await waitForHealth(`http://${config.HOST}:${config.PORT}/api/health`);
  const people = DEMO_PEOPLE.map((p) => `    ${p.email.padEnd(36)} ${p.name}${p.siteRole === 'admin' ? ' (admin)' : ''}`);
  console.log(
    [
      '',
      `  Phasewright is running at ${url}`,
      ...(demo ? [`  Demo sign-in (password for all: ${DEMO_PASSWORD}):`, ...people] : []),
      `  Mail sent by the app: http://127.0.0.1:${mailWebPort}  (or: npm run mail:list)`,
      '  Press Ctrl-C to stop.',
      '',
    ].join('\n'),
  );
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  void stopAll(1);
});
