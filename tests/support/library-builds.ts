/** Build specs and a waiting helper for the library-build API tests. */
import type { LibrarySpec } from '../../shared/optics/library-builder';
import type { LibraryBuild, LibraryBuildResult } from '../../shared/schemas/library-builds';
import type { ApiClient } from './test-app';

/**
 * Si₃N₄ pillars 1200 nm tall on fused silica at 633 nm, P = 450 nm (the demo platform), light from the
 * substrate; `sizes` widths 50 nm apart from 60 nm, at `harmonics` × `harmonics`. Seven sizes are the fewest
 * whose phases cover 2π in eight steps on both axes at 5×5 harmonics (six leave a gap of 0.787 rad), so
 * smallSpec(7, 5) is the smallest build that makes a library runs may use (49 atoms, about a second).
 * Example: smallSpec(3, 5) is a 3 × 3 sweep (60, 110, 160 nm) at 5×5 harmonics.
 */
export function smallSpec(sizes: number, harmonics: number, name = ''): LibrarySpec {
  return {
    name,
    wavelengthNm: 633,
    periodNm: 450,
    heightNm: 1200,
    pillar: 'silicon-nitride',
    substrate: 'fused-silica',
    superstrate: 'air',
    illumination: 'substrate',
    sweep: { minFeatureNm: 60, minGapNm: 450 - 60 - 50 * (sizes - 1), stepNm: 50 },
    harmonics,
  };
}

const FINISHED = ['succeeded', 'failed', 'cancelled'];

/** Polls a build until `done` (default: it has ended); throws after `timeoutMs` naming its last state. */
export async function waitForBuild(
  client: ApiClient,
  projectId: number,
  buildId: number,
  done: (build: LibraryBuild) => boolean = (b) => FINISHED.includes(b.status),
  timeoutMs = 60_000,
): Promise<{ build: LibraryBuild; result: LibraryBuildResult | null }> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await client.get(`/api/projects/${projectId}/library-builds/${buildId}`);
    if (res.status !== 200) throw new Error(`library build ${buildId}: ${res.status} ${JSON.stringify(res.body)}`);
    if (done(res.body.build)) return res.body;
    if (Date.now() > deadline) throw new Error(`library build ${buildId} did not get there within ${timeoutMs} ms; last seen ${JSON.stringify(res.body.build)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
