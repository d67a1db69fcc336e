/**
 * vitest global setup for API and browser tests: a throw-away MariaDB on loopback and the mail fake,
 * started once per test run and stopped afterwards.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { freePort } from '../../scripts/lib/free-port';
import { startMailFake } from '../../scripts/lib/mail-fake';
import { startMariaDb } from '../../scripts/lib/mariadb';

declare module 'vitest' {
  export interface ProvidedContext {
    dbPort: number;
    smtpPort: number;
    mailWebPort: number;
  }
}

export const TEST_DB_USER = 'phasewright_test';
export const TEST_DB_PASSWORD = 'phasewright-test-password';

export default async function setup(project: TestProject) {
  const dataDir = mkdtempSync(path.join(tmpdir(), 'pw-test-db-'));
  const [dbPort, smtpPort, mailWebPort] = [await freePort(), await freePort(), await freePort()];
  const db = await startMariaDb({ dataDir, port: dbPort, user: TEST_DB_USER, password: TEST_DB_PASSWORD, databases: [] });
  const mail = await startMailFake(smtpPort, mailWebPort);
  project.provide('dbPort', dbPort);
  project.provide('smtpPort', smtpPort);
  project.provide('mailWebPort', mailWebPort);
  return async () => {
    await mail.stop();
    await db.stop();
    rmSync(dataDir, { recursive: true, force: true });
  };
}
