/**
 * The run memory estimate (shared/optics/run-memory.ts) against the peaks measured on this project's 2-core
 * build machine with bench/design-run-child.ts (the command line's code path: VmHWM of /proc/self/status, fresh
 * process per run, helper threads off and on, the higher kept; 2026-12-03) and bench/server-run.ts (the server's): the estimate must never fall below a measured peak, and not
 * exceed the larger ones by more than 15 %, so that the budget check neither lets a run through that would not
 * fit nor refuses runs that would.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { estimateRunMemory } from '../../shared/optics/run-memory';
import { designSchema, type DesignInput } from '../../shared/schemas/design';

const ROOT = join(import.meta.dirname, '..', '..');
const demo = (name: string) => JSON.parse(readFileSync(join(ROOT, 'demo-assets/designs', name), 'utf8')) as DesignInput & Record<string, any>;

function twin(cells: number) {
  const d = demo('twin-image.json');
  d.setup.cells = cells;
  return d;
}

function fresnelTwin(cells: number) {
  const d = twin(cells);
  for (const [c, sign] of [['a', 1], ['b', -1]] as const) {
    Object.assign(d.channels[c].terms[0], { fresnelDistanceUm: 2000, window: { units: 'cells', width: cells / 4, centerX: (sign * cells) / 5 } });
  }
  return d;
}

function bessel(cells: number) {
  const d = demo('bessel-vortex.json');
  d.setup.cells = cells;
  return d;
}

/** [design, measured peak MiB]. */
const MEASURED: [string, DesignInput, number][] = [
  ['twin image 1024²', twin(1024), 394],
  ['twin image 2048²', twin(2048), 880],
  ['twin image 4096²', twin(4096), 3118],
  ['Bessel pair 1024²', bessel(1024), 641],
  ['Bessel pair 2048²', bessel(2048), 1431],
  ['Bessel pair 4096² (8192² propagation)', bessel(4096), 4831],
  ['Fresnel twin hologram 1024²', fresnelTwin(1024), 526],
  ['Fresnel twin hologram 4096²', fresnelTwin(4096), 5746],
];

/** Through the server's run pool (bench/server-run.ts: helper threads, tile pyramids up to 4096 px). */
const MEASURED_ON_THE_SERVER: [string, DesignInput, number][] = [
  ['twin image 2048²', twin(2048), 919],
  ['twin image 4096²', twin(4096), 3104],
];

describe('run memory estimate', () => {
  it.each(MEASURED_ON_THE_SERVER)('%s on the server with tile pyramids: at or above the measured peak, within 15 %', (_name, input, measuredMiB) => {
    const { mib } = estimateRunMemory(designSchema.parse(input), { tilesMaxSide: 4096 });
    expect(mib).toBeGreaterThanOrEqual(measuredMiB);
    expect(mib).toBeLessThanOrEqual(measuredMiB * 1.15);
  });

  it.each(MEASURED)('%s: at or above the measured peak, within 15 % of it from 2048² up', (_name, input, measuredMiB) => {
    const design = designSchema.parse(input);
    const { mib } = estimateRunMemory(design, { tilesMaxSide: 0 });
    expect(mib).toBeGreaterThanOrEqual(measuredMiB);
    if (design.setup.cells >= 2048) expect(mib).toBeLessThanOrEqual(measuredMiB * 1.15);
  });

  it('counts propagation only for designs that propagate, on the zero-padded grid', () => {
    const far = estimateRunMemory(designSchema.parse(twin(1024)), { tilesMaxSide: 0 });
    expect(far.parts.map((p) => p.what)).toEqual(['process and helper threads', 'results of 1024² cells']);
    const padded = estimateRunMemory(designSchema.parse(bessel(1024)), { tilesMaxSide: 0 });
    const unpadded = estimateRunMemory(designSchema.parse({ ...bessel(1024), simulation: { padding: 1 } }), { tilesMaxSide: 0 });
    expect(padded.parts.at(-1)!.what).toBe('propagation on 2048² cells');
    expect(unpadded.parts.at(-1)!.what).toBe('propagation on 1024² cells');
    expect(padded.bytes).toBeGreaterThan(unpadded.bytes);
  });
});
