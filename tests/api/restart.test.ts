/**
 * Restart recovery with the real server entry (`node --import tsx server/index.ts`) on its own database:
 * a run killed mid-way (SIGKILL, no chance to clean up) is picked up by the next start and finishes on its
 * second attempt; a graceful stop (SIGTERM) exits promptly and leaves its running run for the next start.
 */
import type { ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunModel } from '../../server/components/runs/run.model';
import { loadConfig } from '../../server/config';
import { createSequelize, migrateUp } from '../../server/db/database';
import { twinImageDesign, waitForRun } from '../support/designs';
import { ApiClient, createTestDatabase, makeUser, signedInClient } from '../support/test-app';
import { startWatchedServer } from '../support/watched-server';

let env: Record<string, string>;
let sequelize: ReturnType<typeof createSequelize>;
let server: ChildProcess | null = null;
let url = '';

async function startServer(): Promise<ChildProcess> {
  const started = await startWatchedServer(env);
  url = started.url;
  return started.child;
}

function exited(child: ChildProcess): Promise<number | null> {
  return child.exitCode !== null ? Promise.resolve(child.exitCode) : new Promise((resolve) => child.once('exit', (code) => resolve(code)));
}

beforeAll(async () => {
  const database = await createTestDatabase();
  env = database.env;
  sequelize = createSequelize(loadConfig(env));
  await migrateUp(sequelize);
});
afterAll(async () => {
  if (server && server.exitCode === null) {
    server.kill('SIGKILL');
    await exited(server);
  }
  await sequelize?.query(`DROP DATABASE \`${env.DB_NAME}\``);
  await sequelize?.close();
});

describe('restart recovery', () => {
  it('finishes a run whose server was killed mid-run on the next start (attempt 2)', async () => {
    const person = await makeUser({ name: 'Restart Designer' });
    server = await startServer();
    let client: ApiClient = await signedInClient(url, person);
    const projectId = (await client.post('/api/projects', { name: 'Restart project' })).body.project.id;
    // Long enough to be caught mid-retrieval by a poll every 100 ms (a few seconds per attempt).
    const design = twinImageDesign({ cells: 512, iterations: 1200, name: 'Long enough to interrupt' });
    const number = (await client.post(`/api/projects/${projectId}/revisions`, { design })).body.revision.number;
    const runId = (await client.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id;
    await waitForRun(client, projectId, runId, (r) => r.status === 'running' && r.stage === 'phase retrieval' && r.progress > 0.05);

    server.kill('SIGKILL');
    await exited(server);
    const left = await RunModel.findByPk(runId);
    expect(left).toMatchObject({ status: 'running', attempts: 1 });

    server = await startServer();
    client = await signedInClient(url, person);
    const run = await waitForRun(client, projectId, runId);
    expect(run.status, run.error ?? '').toBe('succeeded');
    expect(run.attempts).toBe(2);
    expect(run.progress).toBe(1);
    expect(run.convergence.a).toHaveLength(1200);
    expect(run.events.map((e) => e.message)).toEqual(
      expect.arrayContaining(['started', 'the server stopped during attempt 1; queued again', 'started again (attempt 2 of 3)', 'finished']),
    );
    expect(run.artifacts.map((a) => a.name)).toContain('layout.gds');

    // A graceful stop exits promptly and leaves the running run to the next start.
    const second = (await client.post(`/api/projects/${projectId}/revisions/${number}/runs`)).body.run.id;
    await waitForRun(client, projectId, second, (r) => r.status === 'running' && r.progress > 0.02);
    server.kill('SIGTERM');
    expect(await exited(server)).toBe(0);
    expect(await RunModel.findByPk(second)).toMatchObject({ status: 'running', attempts: 1 });
  });
});
