import type { Server } from 'node:http';
import pino from 'pino';
import { createApp } from './app';
import { stopLayoutJobs } from './components/fab/layout-jobs';
import { stopCompareJobs } from './components/runs/run-compare-jobs';
import { createConfiguredRunQueue } from './components/runs/run-queue-config';
import { loadConfig } from './config';
import { createSequelize, migrateUp } from './db/database';
import { createMailer } from './lib/mailer';

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

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'shutting down');
    const force = setTimeout(() => {
      logger.error('shutdown took longer than 10 s; exiting');
      process.exit(1);
    }, 10_000);
    force.unref();
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
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
  // Started by the start command with an IPC channel: if that command dies abruptly, stop rather than linger.
  if (process.send) process.on('disconnect', () => void stop('start command exited'));
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
