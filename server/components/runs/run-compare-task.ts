/**
 * The far-field pictures of a run comparison, on the worker thread of run-compare-jobs.ts (never the request
 * thread): decode both runs' stored far fields (farfield_a.npy, farfield_b.npy: total intensity under inputs
 * A and B, N×N float32), pool them to one preview side, express every pixel as a fraction of its run's
 * incident power (Σ a² of the illumination, as the engine's efficiencies), and paint run a, run b and the
 * difference b − a of each input on one brightness scale. The pooled maps of the last few pairs stay in this
 * thread; the main thread sends the files only when asked (`need-data`).
 */
import { poolMap, type RgbaImage } from '../../../shared/optics/colormap';
import { cellGridOf, illuminationOf } from '../../../shared/optics/design-units';
import { illuminationAmplitude, incidentPower } from '../../../shared/optics/illumination';
import { decodeNpy } from '../../../shared/optics/npy-decode';
import type { Design } from '../../../shared/schemas/design';
import type { FarFieldComparison, FarFieldScale } from '../../../shared/schemas/run-comparison';
import { encodePng } from '../../cli/png';
import { farFieldFullScale } from '../../cli/previews';
import { paintComparison, type CompareChannel, type CompareView } from './run-compare-paint';

/** Largest side of a comparison picture. */
export const COMPARE_MAX_SIDE = 512;

/** One run's stored files the comparison reads. */
export interface CompareRunData {
  runId: number;
  designJson: string;
  farFieldA: Uint8Array;
  farFieldB: Uint8Array;
}

export type CompareJob = {
  /** Name each run's stored files (their ids), run a then run b: a cached pair is used only for the very same files. */
  keys: [string, string];
  data?: [CompareRunData, CompareRunData];
} & ({ kind: 'summary' } | { kind: 'picture'; channel: CompareChannel; show: CompareView });

export type CompareJobResult =
  | { ok: 'need-data' }
  | { ok: true; summary: FarFieldComparison }
  | { ok: true; png: Uint8Array }
  | { ok: false; status: 409; message: string };

/** A run's far fields pooled to `side`, per pixel as a fraction of its incident power. */
interface PooledRun {
  n: number;
  /** λ/P: the far field spans −λ/(2P)…λ/(2P) in u and v. */
  lambdaOverPeriod: number;
  maps: Record<CompareChannel, Float32Array>;
}

interface PooledPair {
  side: number;
  runs: [PooledRun, PooledRun];
  summary: FarFieldComparison;
}

class JobProblem extends Error {}

const cache = new Map<string, PooledPair>();
const CACHE_ENTRIES = 4;

function farFieldOf(runId: number, name: string, bytes: Uint8Array, n: number): Float32Array {
  const { shape, data } = decodeNpy(bytes);
  if (shape.length !== 2 || shape[0] !== n || shape[1] !== n) {
    throw new JobProblem(`Run ${runId}'s ${name} holds a ${shape.join('×')} array where its design has ${n}×${n} cells; start the revision again`);
  }
  return data instanceof Float32Array ? data : Float32Array.from(data);
}

/** Mean-pools an N×N map to side m and divides by the incident power: each pixel's share of that power. */
function normalized(map: Float32Array, n: number, side: number, power: number): Float32Array {
  const factor = n / side;
  const pooled = factor > 1 ? poolMap(map, n, factor) : Float32Array.from(map);
  const scale = (factor * factor) / power;
  for (let i = 0; i < pooled.length; i++) pooled[i] *= scale;
  return pooled;
}

function decodeRun(data: CompareRunData, side: number): PooledRun {
  const design = JSON.parse(data.designJson) as Design;
  const grid = cellGridOf(design);
  const illumination = illuminationOf(design);
  const power = illumination.kind === 'flat' ? grid.n * grid.n : incidentPower(illuminationAmplitude(grid, illumination));
  const a = farFieldOf(data.runId, 'farfield_a.npy', data.farFieldA, grid.n);
  const b = farFieldOf(data.runId, 'farfield_b.npy', data.farFieldB, grid.n);
  return { n: grid.n, lambdaOverPeriod: grid.lambda / grid.period, maps: { a: normalized(a, grid.n, side, power), b: normalized(b, grid.n, side, power) } };
}

/** Largest |b − a| over the two maps. */
function largestDifference(a: Float32Array, b: Float32Array): number {
  let max = 0;
  for (let i = 0; i < a.length; i++) max = Math.max(max, Math.abs(b[i] - a[i]));
  return max;
}

/** Pools both runs to one side (the smaller design's, at most COMPARE_MAX_SIDE) and works out the common scales. */
export function poolPair(data: [CompareRunData, CompareRunData]): PooledPair {
  const ns = data.map((d) => (JSON.parse(d.designJson) as Design).setup.cells);
  const side = Math.min(COMPARE_MAX_SIDE, ...ns);
  const runs = data.map((d) => decodeRun(d, side)) as [PooledRun, PooledRun];
  const [ra, rb] = runs;
  const sameDirections = Math.abs(ra.lambdaOverPeriod - rb.lambdaOverPeriod) <= 1e-9 * ra.lambdaOverPeriod;
  const scales: FarFieldScale[] = (['a', 'b'] as const).map((channel) => ({
    channel,
    fullScale: Math.max(farFieldFullScale(ra.maps[channel], side) ?? 0, farFieldFullScale(rb.maps[channel], side) ?? 0),
    differenceScale: sameDirections ? largestDifference(ra.maps[channel], rb.maps[channel]) : null,
  }));
  const summary: FarFieldComparison = {
    side,
    extent: { a: ra.lambdaOverPeriod / 2, b: rb.lambdaOverPeriod / 2 },
    scales,
    differenceNote: sameDirections
      ? null
      : `The two runs sample different directions (λ/P is ${ra.lambdaOverPeriod.toFixed(4)} and ${rb.lambdaOverPeriod.toFixed(4)}), so their pixels do not match and no difference is drawn; compare runs with the same wavelength and period for one.`,
  };
  return { side, runs, summary };
}

/** The picture `show` of input `channel`, painted on the pair's common scale. */
export function comparisonPicture(pair: PooledPair, channel: CompareChannel, show: CompareView): RgbaImage {
  const scale = pair.summary.scales.find((s) => s.channel === channel)!;
  const [ra, rb] = pair.runs;
  if (show === 'difference') {
    if (scale.differenceScale === null) throw new JobProblem(pair.summary.differenceNote!);
    return paintComparison({ kind: 'difference', a: ra.maps[channel], b: rb.maps[channel], side: pair.side, max: scale.differenceScale });
  }
  return paintComparison({ kind: 'intensity', map: (show === 'a' ? ra : rb).maps[channel], side: pair.side, max: scale.fullScale });
}

/** The same pair seen from the other side: run b becomes run a (the scales do not depend on the order). */
function swapped(pair: PooledPair): PooledPair {
  const { summary } = pair;
  return { side: pair.side, runs: [pair.runs[1], pair.runs[0]], summary: { ...summary, extent: { a: summary.extent.b, b: summary.extent.a } } };
}

export default async function compareTask(job: CompareJob): Promise<CompareJobResult> {
  try {
    // One cache entry per pair whichever side each run is on, so swapping sides costs no new pooling.
    const reversed = job.keys[0] > job.keys[1];
    const key = reversed ? `${job.keys[1]}|${job.keys[0]}` : `${job.keys[0]}|${job.keys[1]}`;
    let stored = cache.get(key);
    if (!stored) {
      if (!job.data) return { ok: 'need-data' };
      stored = poolPair(reversed ? [job.data[1], job.data[0]] : job.data);
    }
    cache.delete(key);
    cache.set(key, stored);
    while (cache.size > CACHE_ENTRIES) cache.delete(cache.keys().next().value!);
    const pair = reversed ? swapped(stored) : stored;
    if (job.kind === 'summary') return { ok: true, summary: pair.summary };
    return { ok: true, png: new Uint8Array(await encodePng(comparisonPicture(pair, job.channel, job.show))) };
  } catch (error) {
    if (error instanceof JobProblem) return { ok: false, status: 409, message: error.message };
    if (error instanceof RangeError || error instanceof SyntaxError) {
      return { ok: false, status: 409, message: `A run's stored far fields cannot be read (${error.message}); start its revision again` };
    }
    throw error;
  }
}
