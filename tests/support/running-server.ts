/** The real app listening on a free loopback port, with the built client and the demo data seeded. */
import type { Server } from 'node:http';
import { existsSync } from 'node:fs';
import { seedDemo } from '../../server/db/seed-demo';
import { freePort } from '../../scripts/lib/free-port';
import { createTestApp, type TestApp } from './test-app';

export interface RunningServer extends TestApp {
  url: string;
}

/** `env` overrides the app's settings (e.g. RUN_QUEUE); `options` as createTestApp's. */
export async function startServerWithDemo(env: Record<string, string> = {}, options: { worker?: boolean } = {}): Promise<RunningServer> {
  if (!existsSync('dist/index.html')) {
    throw new Error('The client is not built: run `npx vite build` first (npm test does it for you)');
  }
  const port = await freePort();
  const url = `http://127.0.0.1:${port}`;
  const t = await createTestApp({ CLIENT_DIST: 'dist', PUBLIC_URL: url, PORT: String(port), RUN_WORKERS: '2', ...env }, options);
  await seedDemo(t.ctx.sequelize, 4);
  // As at a real start: the seeded demo runs are picked up by the queue.
  await t.ctx.runQueue.recover();
  const server: Server = await new Promise((resolve) => {
    const s = t.app.listen(port, '127.0.0.1', () => resolve(s));
  });
  return {
    ...t,
    url,
    async close() {
      server.closeAllConnections();
      await new Promise((r) => server.close(r));
      await t.close();
    },
  };
}
