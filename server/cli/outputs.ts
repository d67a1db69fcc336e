/**
 * The files of a finished run, written into one folder:
 * - numpy arrays (NEP 1 .npy, C order): phase_a/phase_b (channel phases, rad, float64), delta_x/delta_y/theta
 *   (ideal cell parameters, rad, float64), atom_index (int32), farfield_a/farfield_b (realized far-field
 *   intensity under inputs A and B, float32, fftshifted: zero order at (N/2, N/2));
 * - atoms.csv (the library used), design.json (the validated design, defaults filled in), metrics.json,
 *   drc.json (design rules used, violation counts, the first violations);
 * - layout.gds, streamed chunk by chunk (gdsii.ts), never whole in memory; structures only for the atoms used;
 * - PNG previews (previews.ts), painted on this thread or on a worker while the rest is written: among them
 *   the far field under each input as a total and split into output polarization components
 *   (farfield_<input>.png, _out-a.png, _out-b.png, _x.png, _y.png), each input's pictures on one scale.
 */
import { open, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { atomLibraryToCsv } from '../../shared/optics/atoms';
import { gdsiiChunks } from '../../shared/optics/gdsii';
import { npyChunks, type NpyArray } from '../../shared/optics/npy';
import { CHANNEL_IDS, type ChannelId, type DesignRun } from '../../shared/optics/pipeline';
import { drcRecord } from './drc-record';
import { helperPreviewData, previewDataOf, writePreviews, type PreviewData, type PreviewSelection, type WrittenFile } from './previews';

export type { WrittenFile } from './previews';

/** Streams chunks into a new file; returns the number of bytes written. */
async function writeChunks(path: string, chunks: Iterable<Uint8Array>): Promise<number> {
  const file = await open(path, 'w');
  let bytes = 0;
  try {
    for (const chunk of chunks) {
      await file.write(chunk);
      bytes += chunk.length;
    }
  } finally {
    await file.close();
  }
  return bytes;
}

function jsonNumbers(values: ArrayLike<number>): (number | null)[] {
  return Array.from(values, (v) => (Number.isFinite(v) ? v : null));
}

/** The metrics.json record of a run. */
export function metricsRecord(run: DesignRun): Record<string, unknown> {
  const convergence = {} as Record<ChannelId, unknown>;
  const beams = {} as Record<ChannelId, unknown>;
  const foci = {} as Record<ChannelId, unknown>;
  for (const c of CHANNEL_IDS) {
    const ch = run.channels[c];
    convergence[c] = ch.retrieval
      ? {
          algorithm: ch.plan.hologram!.options.algorithm,
          fourierError: jsonNumbers(ch.retrieval.fourierError),
          windowError: jsonNumbers(ch.retrieval.windowError),
          windowEfficiency: jsonNumbers(ch.retrieval.windowEfficiency),
        }
      : null;
    beams[c] = ch.beam
      ? {
          zM: jsonNumbers(ch.beam.z),
          lineIntensity: jsonNumbers(ch.beam.lineIntensity),
          lineIntensityMeaning: ch.beam.spec.charge === 0 ? 'on-axis intensity' : 'mean intensity on the ring of the formula radius',
          profile: {
            zM: ch.beam.profile.z,
            radiusM: jsonNumbers(ch.beam.profile.radius),
            measured: jsonNumbers(ch.beam.profile.measured),
            analytic: jsonNumbers(ch.beam.profile.analytic),
          },
        }
      : null;
    foci[c] = ch.focus ? { radiusM: jsonNumbers(ch.focus.profile.radius), measured: jsonNumbers(ch.focus.profile.measured) } : null;
  }
  const beamLike = CHANNEL_IDS.some((c) => run.channels[c].beam || run.channels[c].focus);
  const notes = [
    'Handedness: optics convention of Born & Wolf, time dependence exp(−iωt): right-circular = [1, −i]/√2 turns clockwise seen by the receiver.',
    'Far fields: fftshifted (zero order at pixel (N/2, N/2)), unitary (sum = power), direction-cosine step λ/(N·P), evanescent pixels zero.',
  ];
  if (run.library.approximate) notes.push(`The atom library "${run.library.name}" is APPROXIMATE: ${run.library.source ?? 'not from full-wave data'}.`);
  if (beamLike) {
    notes.push(
      'Laser safety: focused and Bessel beams concentrate power along a line or in a spot. Follow ANSI Z136.1 / IEC 60825-1 and your institution’s laser safety officer.',
    );
  }
  notes.push('Fabrication uses hazardous chemistry: follow your cleanroom’s own procedures.');
  return {
    format: 'phasewright-metrics/1',
    design: run.design.name,
    grid: { cells: run.grid.n, periodM: run.grid.period, wavelengthM: run.grid.lambda },
    library: { name: run.library.name, atoms: run.library.atoms.length, approximate: run.library.approximate, source: run.library.source ?? null },
    inputs: { a: run.inputs.a, b: run.inputs.b, extra: run.inputs.extra },
    inputsMeaning: 'unit Jones vectors [[x.re, x.im], [y.re, y.im]] of input A, its orthogonal partner B, and the extra preview input',
    analyser: { a: run.analyser[0], b: run.analyser[1], meaning: 'output states λA*, λB* the device sends A and B to' },
    metrics: run.metrics,
    convergence,
    beams,
    foci,
    designRuleViolations: run.drc.violations.slice(0, 50),
    designRuleViolationsTruncated: run.drc.violations.length > 50 || run.drc.truncated,
    timingsMs: run.timings,
    notes,
  };
}

/** Paints and writes PNG previews elsewhere (a worker thread: preview-writer.ts). */
export interface PreviewWriter {
  write(dir: string, data: PreviewData, selection: PreviewSelection): Promise<WrittenFile[]>;
}

/**
 * Writes every output of a run into `dir` (which must exist); returns the files, arrays and records first,
 * previews last. With a `helper`, it paints the far-field and phase previews while this thread writes the
 * arrays and the layout and then paints the rest; without one, everything is done here.
 */
export async function writeRunOutputs(run: DesignRun, dir: string, helper?: PreviewWriter): Promise<WrittenFile[]> {
  const data = previewDataOf(run);
  const helped = helper ? helper.write(dir, helperPreviewData(data), 'helper') : null;
  // Settle the helper's promise even if writing the other files fails, so no rejection goes unobserved.
  helped?.catch(() => undefined);
  const files: WrittenFile[] = [];
  const n = run.grid.n;
  const npy = async (name: string, data: NpyArray) => {
    files.push({ name, bytes: await writeChunks(join(dir, name), npyChunks(data, [n, n])) });
  };
  const text = async (name: string, content: string) => {
    await writeFile(join(dir, name), content);
    files.push({ name, bytes: Buffer.byteLength(content) });
  };
  await npy('phase_a.npy', run.channels.a.phase);
  await npy('phase_b.npy', run.channels.b.phase);
  await npy('delta_x.npy', run.decomposition.deltaX);
  await npy('delta_y.npy', run.decomposition.deltaY);
  await npy('theta.npy', run.decomposition.theta);
  await npy('atom_index.npy', run.mapping.atomIndex);
  await npy('farfield_a.npy', run.farFields.a.total);
  await npy('farfield_b.npy', run.farFields.b.total);
  await text('atoms.csv', atomLibraryToCsv(run.library));
  await text('design.json', JSON.stringify(run.design, null, 2) + '\n');
  await text('metrics.json', JSON.stringify(metricsRecord(run), null, 2) + '\n');
  await text('drc.json', JSON.stringify(drcRecord(run), null, 2) + '\n');
  const layout = run.design.layout;
  const gdsBytes = await writeChunks(
    join(dir, 'layout.gds'),
    gdsiiChunks({ n, period: run.grid.period, atomIndex: run.mapping.atomIndex, theta: run.mapping.theta, library: run.library, layer: layout.layer, datatype: layout.datatype, usedAtomsOnly: true }),
  );
  files.push({ name: 'layout.gds', bytes: gdsBytes });
  const own = await writePreviews(dir, data, helped ? 'rest' : 'all');
  if (helped) files.push(...(await helped));
  files.push(...own);
  return files;
}
