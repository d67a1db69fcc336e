/** Small designs and helpers for the revision, run and upload API tests. */
import type { DesignInput } from '../../shared/schemas/design';
import type { RunDetail } from '../../shared/schemas/runs';
import type { ApiClient } from './test-app';

/** A twin-image hologram on 64×64 cells with a few GS iterations: a run of well under a second. */
export function twinImageDesign(overrides: { cells?: number; iterations?: number; name?: string } = {}): DesignInput {
  const iterations = overrides.iterations ?? 8;
  return {
    name: overrides.name ?? 'Small twin-image tag',
    setup: { wavelengthNm: 633, periodNm: 450, cells: overrides.cells ?? 64 },
    polarization: { kind: 'circular', handedness: 'left' },
    channels: {
      a: {
        label: 'Lighthouse',
        terms: [{ kind: 'hologram', image: { source: 'demo', name: 'lighthouse' }, window: { units: 'degrees', width: 14, centerX: 16 }, iterations, seed: 3 }],
      },
      b: {
        label: 'Compass rose',
        terms: [{ kind: 'hologram', image: { source: 'demo', name: 'compass-rose' }, window: { units: 'degrees', width: 14, centerX: -16 }, iterations, seed: 5 }],
      },
    },
  };
}

/** Two analytic channels (tilt, vortex + tilt) on 64×64 cells: no phase retrieval at all. */
export function deflectorDesign(): DesignInput {
  return {
    name: 'Twin deflector',
    setup: { wavelengthNm: 633, periodNm: 450, cells: 64 },
    polarization: { kind: 'linear', angleDeg: 0 },
    channels: {
      a: { terms: [{ kind: 'tilt', thetaXDeg: 10 }] },
      b: { terms: [{ kind: 'vortex', charge: 1 }, { kind: 'tilt', thetaXDeg: -10 }] },
    },
  };
}

const FINISHED = ['succeeded', 'failed', 'cancelled'];

/** Polls the run's detail route until `done(run)` holds (default: finished); fails after `timeoutMs`. */
export async function waitForRun(
  client: ApiClient,
  projectId: number,
  runId: number,
  done: (run: RunDetail) => boolean = (run) => FINISHED.includes(run.status),
  timeoutMs = 45_000,
): Promise<RunDetail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await client.get(`/api/projects/${projectId}/runs/${runId}`);
    if (res.status !== 200) throw new Error(`run ${runId}: ${res.status} ${JSON.stringify(res.body)}`);
    const run = res.body.run as RunDetail;
    if (done(run)) return run;
    if (Date.now() > deadline) throw new Error(`run ${runId} did not get there within ${timeoutMs} ms; last seen ${run.status} ${run.stage} ${run.progress}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** GET of a binary body of any content type, collected into a Buffer. */
export function download(client: ApiClient, url: string) {
  return client
    .get(url)
    .buffer(true)
    .parse((res, callback) => {
      const chunks: Buffer[] = [];
      res.on('data', (chunk: Buffer) => chunks.push(chunk));
      res.on('end', () => callback(null, Buffer.concat(chunks)));
    });
}
