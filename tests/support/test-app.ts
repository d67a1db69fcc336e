/** Builds a real app on its own fresh MariaDB database for one test file, plus a signed-in HTTP client. */
import { randomBytes } from 'node:crypto';
import mariadb from 'mariadb';
import pino from 'pino';
import request from 'supertest';
import type { Express } from 'express';
import { inject } from 'vitest';
import { createApp } from '../../server/app';
import { loadConfig } from '../../server/config';
import type { AppContext } from '../../server/context';
import { stopLayoutJobs } from '../../server/components/fab/layout-jobs';
import { stopCompareJobs } from '../../server/components/runs/run-compare-jobs';
import { createConfiguredRunQueue, workerOptions } from '../../server/components/runs/run-queue-config';
import { createRedisRunWorker, type RedisRunWorker } from '../../server/components/runs/run-queue-redis';
import { createSequelize, migrateUp } from '../../server/db/database';
import { createMailer } from '../../server/lib/mailer';
import { UserModel } from '../../server/components/users/user.model';
import { hashPassword } from '../../server/components/users/user.service';
import type { SiteRole } from '../../shared/roles';
import { TEST_DB_PASSWORD, TEST_DB_USER } from './global-services';

export interface TestApp {
  app: Express;
  ctx: AppContext;
  close(): Promise<void>;
}

/** The environment of a test server on its own fresh, empty database (no tables yet). */
export async function createTestDatabase(env: Record<string, string> = {}): Promise<{ env: Record<string, string>; dbName: string }> {
  // DB_PORT in `env`: a MariaDB of the test's own (with the same test account) instead of the shared one.
  const dbPort = env.DB_PORT ? Number(env.DB_PORT) : inject('dbPort');
  const dbName = `pw_test_${randomBytes(6).toString('hex')}`;
  const admin = await mariadb.createConnection({ host: '127.0.0.1', port: dbPort, user: TEST_DB_USER, password: TEST_DB_PASSWORD });
  await admin.query(`CREATE DATABASE \`${dbName}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await admin.end();
  return {
    dbName,
    env: {
      NODE_ENV: 'test',
      DB_PORT: String(dbPort),
      DB_NAME: dbName,
      DB_USER: TEST_DB_USER,
      DB_PASSWORD: TEST_DB_PASSWORD,
      SMTP_PORT: String(inject('smtpPort')),
      BCRYPT_COST: '4',
      // Test files run side by side: their runs keep the priority of the rest of the suite.
      RUN_WORKER_NICE: '0',
      LOG_LEVEL: 'silent',
      CLIENT_DIST: '/nonexistent-client-dist',
      PUBLIC_URL: 'http://127.0.0.1:5999',
      // RUN_QUEUE=redis: the test Redis, with this file's own keys.
      REDIS_URL: inject('redisUrl'),
      REDIS_PREFIX: dbName,
      ...env,
    },
  };
}

/** The run queue engines the queue and run tests run against. */
export const RUN_QUEUE_ENGINES = ['embedded', 'redis'] as const;

/**
 * `worker`: with RUN_QUEUE=redis, also a worker in this process (on the same database connection) taking the
 * queue's runs; false when the test starts worker processes of its own.
 */
export async function createTestApp(env: Record<string, string> = {}, options: { worker?: boolean } = {}): Promise<TestApp> {
  const database = await createTestDatabase(env);
  const dbName = database.dbName;
  const config = loadConfig(database.env);
  const logger = pino({ level: config.LOG_LEVEL });
  const sequelize = createSequelize(config);
  await migrateUp(sequelize);
  const mailer = createMailer(config, logger);
  const runQueue = createConfiguredRunQueue(config, logger, config.RUN_WORKERS ?? 1);
  const worker: RedisRunWorker | null =
    config.RUN_QUEUE === 'redis' && options.worker !== false ? createRedisRunWorker(workerOptions(config, logger, config.RUN_WORKERS ?? 1)) : null;
  const ctx: AppContext = { config, sequelize, mailer, logger, runQueue };
  const { app, inputs } = createApp(ctx);
  await runQueue.start();
  await worker?.start();
  return {
    app,
    ctx,
    async close() {
      await Promise.all([runQueue.stop(), worker?.stop(), stopLayoutJobs(), stopCompareJobs()]);
      await inputs.close();
      await mailer.drain();
      await sequelize.query(`DROP DATABASE \`${dbName}\``);
      await sequelize.close();
    },
  };
}

let counter = 0;
/** Creates an account directly in the database; returns its id and credentials. */
export async function makeUser(opts: { siteRole?: SiteRole; name?: string; password?: string; email?: string } = {}) {
  counter += 1;
  const password = opts.password ?? 'correct horse battery';
  const email = opts.email ?? `person${counter}.${randomBytes(3).toString('hex')}@lab.example`;
  const user = await UserModel.create({
    email,
    name: opts.name ?? `Person ${counter}`,
    siteRole: opts.siteRole ?? 'member',
    passwordHash: await hashPassword(password, 4),
  });
  return { id: user.id, email, password };
}

/** An HTTP client with a cookie jar that sends the CSRF token like the web client does. */
export class ApiClient {
  readonly agent: ReturnType<typeof request.agent>;
  csrfToken = '';

  /** `app`: the Express app in this process, or the base URL of a server running elsewhere. */
  constructor(app: Express | string) {
    this.agent = request.agent(app);
  }

  async start() {
    const res = await this.agent.get('/api/auth/csrf').expect(200);
    this.csrfToken = res.body.csrfToken;
    return this;
  }

  async signIn(email: string, password: string) {
    const res = await this.post('/api/auth/sign-in', { email, password });
    if (res.status !== 200) throw new Error(`sign-in failed: ${res.status} ${JSON.stringify(res.body)}`);
    this.csrfToken = res.body.csrfToken;
    return res;
  }

  get(url: string) {
    return this.agent.get(url);
  }
  post(url: string, body?: object) {
    return this.agent.post(url).set('x-csrf-token', this.csrfToken).send(body ?? {});
  }
  patch(url: string, body?: object) {
    return this.agent.patch(url).set('x-csrf-token', this.csrfToken).send(body ?? {});
  }
  delete(url: string) {
    return this.agent.delete(url).set('x-csrf-token', this.csrfToken);
  }
}

export async function signedInClient(app: Express | string, user: { email: string; password: string }) {
  const client = await new ApiClient(app).start();
  await client.signIn(user.email, user.password);
  return client;
}
