/**
 * A run worker process (`npm run worker`, RUN_QUEUE=redis): takes runs and tolerance studies from the queue in
 * Redis (REDIS_URL) and executes them on its own thread pool (RUN_WORKERS threads; default one per core),
 * writing progress and files to MariaDB (DB_HOST, DB_PORT, DB_NAME, DB_USER, DB_PASSWORD). Needs nothing
 * else: start as many as the machines allow. On SIGTERM/SIGINT its runs are abandoned as they are; another
 * worker takes them once their hold expires (RUN_LOCK_SECONDS), as one more attempt.
 */
import pino from 'pino';
import { workerOptions } from './components/runs/run-queue-config';
import { createRedisRunWorker } from './components/runs/run-queue-redis';
import { loadConfig } from './config';
import { createSequelize } from './db/database';
import { stopOnSignals } from './lib/shutdown';

async function main() {
  const config = loadConfig();
  const logger = pino({ level: config.LOG_LEVEL }).child({ worker: process.pid });
  const sequelize = createSequelize(config);
  // A worker may start before the database does (or while it is away): it waits rather than giving up.
  for (let said = false; ; ) {
    const error = await sequelize.authenticate().then(() => null, (err: Error) => err);
    if (!error) break;
    if (!said) logger.warn({ err: error.message }, 'MariaDB does not answer: waiting for it');
    said = true;
    await new Promise((resolve) => setTimeout(resolve, 1_000));
  }
  const worker = createRedisRunWorker(workerOptions(config, logger));
  await worker.start();
  logger.info({ redis: config.REDIS_URL.replace(/\/\/[^@]*@/, '//…@'), threads: config.RUN_WORKERS ?? 'one per core' }, 'run worker taking jobs');

  stopOnSignals(logger, 'run worker stopping', async () => {
    await worker.stop();
    await sequelize.close();
  });
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
