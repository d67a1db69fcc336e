import { readdirSync, readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { currentThreadId } from '../../server/lib/thread-priority';
import { twinImageDesign, waitForRun } from '../support/designs';
import { createTestApp, makeUser, signedInClient, type ApiClient, type TestApp } from '../support/test-app';

const NICE = 7;
let t: TestApp;
let designer: ApiClient;

beforeAll(async () => {
  // Helper threads too: they are started by the pool thread and must inherit its priority.
  t = await createTestApp({ RUN_WORKER_NICE: String(NICE), RUN_HELPER_THREADS: 'true' });
  designer = await signedInClient(t.app, await makeUser());
});
afterAll(async () => {
  await t?.close();
});

/** Nice value of every thread of this process, by thread id (field 19 of /proc/<pid>/task/<tid>/stat). */
function niceOfThreads(): Map<number, number> {
  const nice = new Map<number, number>();
  for (const tid of readdirSync('/proc/self/task')) {
    try {
      const stat = readFileSync(`/proc/self/task/${tid}/stat`, 'utf8');
      nice.set(Number(tid), Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[16]));
    } catch {
      // the thread ended meanwhile
    }
  }
  return nice;
}

describe.runIf(process.platform === 'linux')('run threads yield the CPU to requests', () => {
  it('runs a design on threads at RUN_WORKER_NICE while the request thread keeps its priority', async () => {
    const mine = currentThreadId();
    const before = niceOfThreads().get(mine);
    expect(before).toBeLessThan(NICE);
    const projectId = (await designer.post('/api/projects', { name: 'Priority' })).body.project.id;
    const revision = await designer.post(`/api/projects/${projectId}/revisions`, { design: twinImageDesign({ cells: 256, iterations: 60 }) });
    expect(revision.status, JSON.stringify(revision.body)).toBe(201);
    const started = await designer.post(`/api/projects/${projectId}/revisions/${revision.body.revision.number}/runs`);
    expect(started.status).toBe(202);

    let niced = 0;
    const run = await waitForRun(designer, projectId, started.body.run.id, (r) => {
      if (r.status === 'running') niced = Math.max(niced, [...niceOfThreads().values()].filter((n) => n === NICE).length);
      return ['succeeded', 'failed', 'cancelled'].includes(r.status);
    });
    expect(run.status, run.error ?? '').toBe('succeeded');
    expect(niced).toBeGreaterThanOrEqual(1);
    expect(niceOfThreads().get(mine)).toBe(before);
  });
});
