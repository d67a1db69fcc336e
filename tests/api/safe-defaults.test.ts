/**
 * Safe defaults off loopback: no published session secret and no demo accounts on a reachable address; the
 * private MariaDB gives the app's user its own databases only and root to no one over TCP.
 */
import mariadb from 'mariadb';
import { describe, expect, it } from 'vitest';
import { inject } from 'vitest';
import { isLoopback, loadConfig, seedsDemo } from '../../server/config';
import { TEST_DB_PASSWORD, TEST_DB_USER } from '../support/global-services';

describe('configuration off loopback', () => {
  it('refuses a non-loopback HOST with the default SESSION_SECRET, in one line naming the variable', () => {
    for (const HOST of ['0.0.0.0', '192.168.1.20', '::', 'lab-server.example']) {
      expect(() => loadConfig({ HOST })).toThrow(/^Invalid configuration: SESSION_SECRET [^\n]*not loopback$/);
    }
    expect(loadConfig({ HOST: '0.0.0.0', SESSION_SECRET: 'a-secret-of-our-own-1234' }).HOST).toBe('0.0.0.0');
    for (const HOST of ['127.0.0.1', '127.0.0.2', 'localhost', '::1', '[::1]']) {
      expect(isLoopback(HOST)).toBe(true);
      expect(loadConfig({ HOST }).HOST).toBe(HOST);
    }
  });

  it('seeds the demo accounts on loopback, and elsewhere only with SEED_DEMO=true', () => {
    const own = { SESSION_SECRET: 'a-secret-of-our-own-1234' };
    expect(seedsDemo(loadConfig({}))).toBe(true);
    expect(seedsDemo(loadConfig({ SEED_DEMO: 'false' }))).toBe(false);
    expect(seedsDemo(loadConfig({ ...own, HOST: '0.0.0.0' }))).toBe(false);
    expect(seedsDemo(loadConfig({ ...own, HOST: '0.0.0.0', SEED_DEMO: 'true' }))).toBe(true);
    expect(() => loadConfig({ SEED_DEMO: 'sure' })).toThrow(/SEED_DEMO/);
  });
});

describe('the private MariaDB', () => {
  const port = () => inject('dbPort');

  it.each([
    ['over loopback TCP', () => ({ host: '127.0.0.1', port: port() })],
    ['through the unix socket (DB_SOCKET)', () => ({ socketPath: inject('dbSocket') })],
  ])('gives the app’s user privileges on its own databases only: nothing on *.*, no FILE — %s', async (_way, where) => {
    const conn = await mariadb.createConnection({ ...where(), user: TEST_DB_USER, password: TEST_DB_PASSWORD });
    try {
      const grants = ((await conn.query('SHOW GRANTS')) as Record<string, string>[]).map((row) => Object.values(row)[0]);
      const global = grants.filter((g) => g.includes(' ON *.* '));
      expect(global.every((g) => g.startsWith('GRANT USAGE ON *.* ')), grants.join('\n')).toBe(true);
      expect(grants.join('\n')).not.toMatch(/\bFILE\b/);
      await expect(conn.query('CREATE DATABASE `not_a_test_database`')).rejects.toThrow(/Access denied/);
      await expect(conn.query("SELECT LOAD_FILE('/etc/passwd') IS NULL AS refused")).resolves.toEqual([{ refused: 1 }]);
    } finally {
      await conn.end();
    }
  });

  it('takes the app’s account through the unix socket only with its password', async () => {
    await expect(mariadb.createConnection({ socketPath: inject('dbSocket'), user: TEST_DB_USER, password: 'not-the-password', connectTimeout: 3000 })).rejects.toThrow(/Access denied/);
  });

  it('lets nobody sign in as root over TCP without a password', async () => {
    for (const host of ['127.0.0.1', '::1']) {
      await expect(mariadb.createConnection({ host, port: port(), user: 'root', password: '', connectTimeout: 3000 })).rejects.toThrow();
    }
  });
});
