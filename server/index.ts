import type { Server } from 'node:http';
import pino from 'pino';
import { createApp } from './app';
import { loadConfig } from './config';
import { createSequelize, migrateUp } from './db/database';
import { createMailer } from './lib/mailer';

/** Connects, migrates, listens; stops accepting, finishes in-flight requests and closes the pool on SIGTERM/SIGINT. */
async function main() {
  const config = loadConfig();
  const logger = pino({ level: config.LOG_LEVEL });
  const sequelize = createSequelize(config);
  await sequelize.authenticate();
  const applied = await migrateUp(sequelize);
  if (applied.length) logger.info({ applied }, 'migrations applied');
  const mailer = createMailer(config, logger);
  const { app } = createApp({ config, sequelize, mailer, logger });
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
    await new Promise<void>((resolve) => {
      server.close(() => resolve());
      server.closeIdleConnections();
    });
    await mailer.drain();
    await sequelize.close();
    process.exit(0);
  };
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('SIGINT', () => void stop('SIGINT'));
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
