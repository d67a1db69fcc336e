/**
 * vitest global setup for API and browser tests: a throw-away MariaDB and Redis on loopback and the mail fake,
 * started once per test run and stopped afterwards.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { freePort } from '../../scripts/lib/free-port';
import { startMailFake } from '../../scripts/lib/mail-fake';
import { startMariaDb } from '../../scripts/lib/mariadb';
import { startRedis } from '../../scripts/lib/redis';

declare module 'vitest' {
  export interface ProvidedContext {
    dbPort: number;
    /** The same MariaDB's unix socket (DB_SOCKET). */
    dbSocket: string;
    smtpPort: number;
    mailWebPort: number;
    /** The test Redis (RUN_QUEUE=redis); each test file uses its own key prefix. */
    redisUrl: string;
  }
}

export const TEST_DB_USER = 'phasewright_test';
export const TEST_DB_PASSWORD = 'phasewright-test-password';
/** Names of the test databases (tests/support/test-app.ts), as a LIKE pattern for the grant. */
export const TEST_DB_PATTERN = 'pw\\_test\\_%';

export default async function setup(project: TestProject) {
  const dataDir = mkdtempSync(path.join(tmpdir(), 'pw-test-db-'));
  const [dbPort, smtpPort, mailWebPort] = [await freePort(), await freePort(), await freePort()];
  // Each test file creates its own pw_test_… database: the test user may create and use those, nothing else.
  const db = await startMariaDb({ dataDir, port: dbPort, user: TEST_DB_USER, password: TEST_DB_PASSWORD, databases: [], grants: [TEST_DB_PATTERN] });
  const mail = await startMailFake(smtpPort, mailWebPort);
  const redis = await startRedis({ port: await freePort(), dataDir: null });
  project.provide('redisUrl', redis.url);
  project.provide('dbPort', dbPort);
  project.provide('dbSocket', db.socket);
  project.provide('smtpPort', smtpPort);
  project.provide('mailWebPort', mailWebPort);
  return async () => {
    await mail.stop();
    await redis.stop();
    await db.stop();
    rmSync(dataDir, { recursive: true, force: true });
  };
}
