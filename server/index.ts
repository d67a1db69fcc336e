import type { Server } from 'node:http';
import pino from 'pino';
import { createApp } from './app';
import { stopLayoutJobs } from './components/fab/layout-jobs';
import { stopCompareJobs } from './components/runs/run-compare-jobs';
import { createConfiguredRunQueue } from './components/runs/run-queue-config';
import { loadConfig } from './config';
import { createSequelize, migrateUp } from './db/database';
import { createMailer } from './lib/mailer';
import { stopOnSignals } from './lib/shutdown';

/**
 * Connects, migrates, starts the run queue (which queues runs interrupted by the last stop again), listens.
 * On SIGTERM/SIGINT: stops accepting, stops the run queue (running runs stay 'running' and are picked up
 * by the next start), finishes in-flight requests and closes the pool.
 */
async function main() {
  const config = loadConfig();
  const logger = pino({ level: config.LOG_LEVEL });
  const sequelize = createSequelize(config);
  await sequelize.authenticate();
  const applied = await migrateUp(sequelize);
  if (applied.length) logger.info({ applied }, 'migrations applied');
  const mailer = createMailer(config, logger);
  // RUN_QUEUE=redis: runs execute on `npm run worker` processes; this process only enqueues.
  const runQueue = createConfiguredRunQueue(config, logger);
  const { app, inputs } = createApp({ config, sequelize, mailer, logger, runQueue });
  await runQueue.start();
  const server: Server = app.listen(config.PORT, config.HOST, () => {
    logger.info(`Phasewright listening on ${config.publicUrl}`);
  });

  // On SIGTERM/SIGINT, or when the start command that launched this process dies: stop rather than linger.
  stopOnSignals(logger, 'shutting down', async () => {
    const closing = new Promise<void>((resolve) => {
      server.close(() => resolve());
      server.closeIdleConnections();
    });
    await Promise.all([runQueue.stop(), stopLayoutJobs(), stopCompareJobs()]);
    // Requests in flight get 5 s; long-lived ones (run event streams) are then cut, clients reconnect.
    await Promise.race([closing, new Promise((resolve) => setTimeout(resolve, 5_000).unref())]);
    server.closeAllConnections();
    await closing;
    await inputs.close();
    await mailer.drain();
    await sequelize.close();
  });
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
