/**
 * GET /api/health: no sign-in, the database pinged with its own time limit, the run queue's and the input
 * pool's state; 503 with the details, still within 200 ms, when the database does not answer.
 */
import { createServer, type Socket } from 'node:net';
import pino from 'pino';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createApp } from '../../server/app';
import { createEmbeddedRunQueue } from '../../server/components/runs/run-queue';
import { createSequelize } from '../../server/db/database';
import { createMailer } from '../../server/lib/mailer';
import { freePort } from '../../scripts/lib/free-port';
import { createTestApp, type TestApp } from '../support/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t?.close();
});

describe('GET /api/health', () => {
  it('answers without a session: database, run queue and input pool', async () => {
    const res = await request(t.app).get('/api/health').expect(200);
    expect(res.headers['set-cookie']).toBeUndefined();
    expect(res.body).toMatchObject({
      ok: true,
      database: { ok: true },
      runQueue: { accepting: true, threads: 1, running: 0, waiting: 0 },
      inputs: { maxThreads: 1, running: 0, queued: 0, maxQueue: 8 },
    });
    expect(res.body.database.ms).toBeLessThan(100);
  });

  it('reaches the database through its unix socket when DB_SOCKET is set (as `npm start` does)', async () => {
    const overSocket = await createTestApp({ DB_SOCKET: inject('dbSocket') });
    try {
      const res = await request(overSocket.app).get('/api/health').expect(200);
      expect(res.body.database).toMatchObject({ ok: true });
      // The account MariaDB matched: @localhost is the socket's, @127.0.0.1 would be loopback TCP.
      const [who] = (await overSocket.ctx.sequelize.query('SELECT CURRENT_USER() AS who', { type: 'SELECT' })) as { who: string }[];
      expect(who.who).toMatch(/@localhost$/);
    } finally {
      await overSocket.close();
    }
  });

  it('answers 503 within 200 ms when the database takes connections but never answers', async () => {
    // A TCP server that accepts and stays silent: the database driver waits for a greeting that never comes.
    const sockets = new Set<Socket>();
    const silent = createServer((socket) => {
      sockets.add(socket);
      socket.on('close', () => sockets.delete(socket));
    });
    const port = await freePort();
    await new Promise<void>((resolve) => silent.listen(port, '127.0.0.1', resolve));
    const config = { ...t.ctx.config, DB_PORT: port };
    const logger = pino({ level: 'silent' });
    const sequelize = createSequelize(config);
    const runQueue = createEmbeddedRunQueue({ logger, threads: 1 });
    const { app, inputs } = createApp({ config, sequelize, mailer: createMailer(config, logger), logger, runQueue });
    const listening = app.listen(0, '127.0.0.1');
    await new Promise((resolve) => listening.once('listening', resolve));
    const url = `http://127.0.0.1:${(listening.address() as { port: number }).port}/api/health`;
    try {
      const times: number[] = [];
      // The first request of a fresh app also compiles its code paths; the criterion is about answers after that.
      await (await fetch(url)).arrayBuffer();
      for (let i = 0; i < 3; i++) {
        const started = performance.now();
        const res = await fetch(url);
        const body = (await res.json()) as { ok: boolean; database: object; runQueue: { accepting: boolean } };
        times.push(performance.now() - started);
        expect(res.status).toBe(503);
        expect(body.ok).toBe(false);
        expect(body.database).toMatchObject({ ok: false, error: `no answer within ${config.HEALTH_DB_TIMEOUT_MS} ms` });
        expect(body.runQueue.accepting).toBe(false);
      }
      expect(Math.max(...times), `answered in ${times.map((ms) => ms.toFixed(0)).join(', ')} ms`).toBeLessThan(200);
    } finally {
      listening.closeAllConnections();
      listening.close();
      await runQueue.stop();
      await inputs.close();
      for (const s of sockets) s.destroy();
      silent.close();
      await sequelize.close().catch(() => undefined);
    }
  });
});
