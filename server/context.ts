import type { Logger } from 'pino';
import type { Sequelize } from 'sequelize';
import type { RunQueue } from './components/runs/run-queue';
import type { AppConfig } from './config';
import type { Mailer } from './lib/mailer';

/** What every component needs from the outside world, built once by the entry point or a test. */
export interface AppContext {
  config: AppConfig;
  sequelize: Sequelize;
  mailer: Mailer;
  logger: Logger;
  /** Executes design runs off the request thread. */
  runQueue: RunQueue;
}
