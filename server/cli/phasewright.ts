/**
 * The `phasewright` command line: batch runs of design files.
 *
 *   phasewright run DESIGN.json --out DIR [--sequential] [--tiles[=SIDE]]
 *   phasewright library build SPEC.json --out atoms.csv [--threads N]
 *   phasewright --help
 *
 * Progress goes to stderr, the summary to stdout. Exit codes: 0 done, 1 the run failed, 2 bad input
 * (command line, design file or a file it refers to; the message names the field), 130 interrupted.
 */
import { resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { formatMetricValue, INPUT_NAMES } from '../../shared/display-names';
import { LIGHT_SIDE_LABELS } from '../../shared/optics/atoms';
import { DesignUnitsError } from '../../shared/optics/design-units';
import { CHANNEL_IDS } from '../../shared/optics/pipeline';
import type { Metric, MetricGroup } from '../../shared/optics/run-metrics';
import { InputError } from './design-files';
import { libraryBuildCommand, parseLibraryBuildArgs, type LibraryBuildArgs } from './library-build';
import { runDesignFile, type RunFileResult } from './run-design-file';

export const USAGE = `Phasewright — design polarization-multiplexed metasurfaces from the command line.

Usage:
  phasewright run DESIGN.json --out DIR [--sequential]
  phasewright library build SPEC.json --out atoms.csv [--threads N]
  phasewright --help

run          Reads the design file (format phasewright-design/1), retrieves both channels' phases,
             maps the cells to meta-atoms, simulates the realized device and writes into DIR:
               phase_a.npy phase_b.npy          channel phases, rad, float64, N×N
               delta_x.npy delta_y.npy theta.npy ideal cell parameters, rad, float64
               atom_index.npy                   chosen atom per cell, int32 (rows of atoms.csv)
               farfield_a.npy farfield_b.npy    far-field intensity under inputs A and B, float32,
                                                zero order at the centre pixel (N/2, N/2)
               atoms.csv design.json metrics.json layout.gds
               farfield_{a,b,extra}.png phase_{a,b}.png atom_index.png rotation.png [xz_{a,b}.png]
             Files named in the design are read relative to the design file's folder.
--out DIR    Folder for the results (created if missing).
--sequential Retrieve the two channels one after the other on one thread (default: two worker threads).
--tiles[=SIDE]
             Also write tile pyramids of the far fields and maps of designs above 256² cells, as the server
             does for its run pages: one <picture>.tiles file each (256-px PNG tiles, every level down to
             one tile; format in README "Tile pyramids"). SIDE: largest side of level 0 (default 4096;
             larger designs are halved to it).
library build
             Computes a meta-atom library by RCWA from SPEC.json (wavelengthNm, periodNm, heightNm,
             pillar, substrate, superstrate, illumination, sweep {minFeatureNm, minGapNm, stepNm},
             harmonics; see README) and writes atoms.csv (not approximate, with its source line)
             and atoms.powers.csv (zeroth-order and other-order powers per atom).
--threads N  library build: compute on N worker threads (default 1: the main thread).
--help       This text.

Exit codes: 0 done, 1 the run failed, 2 bad input (the message names the field), 130 interrupted.`;

interface RunArgs {
  design: string;
  out: string;
  sequential: boolean;
  /** Largest side of the tile pyramids' level 0; null: no pyramids. */
  tilesMaxSide: number | null;
}

/** Level 0's largest side of `--tiles` without a value: every design size at full resolution. */
const CLI_TILES_MAX_SIDE = 4096;

function parseTilesSide(value: string): number {
  const side = Number(value);
  if (!/^[0-9]+$/.test(value) || !(side >= 256 && side <= 65_536)) throw new InputError(`--tiles=SIDE needs a whole number of pixels from 256 to 65536, not '${value}'`);
  return side;
}

function parseArgs(argv: string[]): { help: true } | { help: false; run: RunArgs } | { help: false; library: LibraryBuildArgs } {
  if (argv.length === 0 || argv.includes('--help') || argv.includes('-h') || argv[0] === 'help') return { help: true };
  const [command, ...rest] = argv;
  if (command === 'library') {
    if (rest[0] !== 'build') throw new InputError(`unknown library command '${rest[0] ?? ''}' (try: phasewright library build SPEC.json --out atoms.csv)`);
    return { help: false, library: parseLibraryBuildArgs(rest.slice(1)) };
  }
  if (command !== 'run') throw new InputError(`unknown command '${command}' (try: phasewright --help)`);
  let design: string | undefined;
  let out: string | undefined;
  let sequential = false;
  let tilesMaxSide: number | null = null;
  for (let i = 0; i < rest.length; i++) {
    const arg = rest[i];
    if (arg === '--out' || arg === '-o') {
      out = rest[++i];
      if (!out) throw new InputError('--out needs a folder');
    } else if (arg.startsWith('--out=')) out = arg.slice('--out='.length);
    else if (arg === '--sequential') sequential = true;
    else if (arg === '--tiles') tilesMaxSide = CLI_TILES_MAX_SIDE;
    else if (arg.startsWith('--tiles=')) tilesMaxSide = parseTilesSide(arg.slice('--tiles='.length));
    else if (arg.startsWith('-')) throw new InputError(`unknown option '${arg}' (try: phasewright --help)`);
    else if (design === undefined) design = arg;
    else throw new InputError(`unexpected argument '${arg}': give one design file`);
  }
  if (!design) throw new InputError('run needs a design file: phasewright run DESIGN.json --out DIR');
  if (!out) throw new InputError('run needs --out DIR');
  return { help: false, run: { design, out, sequential, tilesMaxSide } };
}

/** A metric's value with its unit, as the web app shows it (shared/display-names.ts). */
export function formatMetric(m: Metric): string {
  return m.value === null ? 'n/a' : formatMetricValue(m);
}

function formatGroup(title: string, group: MetricGroup): string[] {
  const lines = [`${title}`];
  const width = Math.max(...Object.keys(group).map((k) => k.length));
  for (const [key, m] of Object.entries(group)) lines.push(`  ${key.padEnd(width)}  ${formatMetric(m).padStart(12)}   ${m.meaning}`);
  return lines;
}

function formatBytes(bytes: number): string {
  if (bytes >= 1 << 20) return `${(bytes / (1 << 20)).toFixed(1)} MiB`;
  if (bytes >= 1 << 10) return `${(bytes / (1 << 10)).toFixed(1)} KiB`;
  return `${bytes} B`;
}

/** The stdout summary of a finished run. */
export function summary(result: RunFileResult, outDir: string): string {
  const { run, files, timings } = result;
  const lines = [
    `Phasewright run of "${run.design.name}": ${run.grid.n}×${run.grid.n} cells, P = ${(run.grid.period * 1e9).toFixed(1)} nm, λ = ${(run.grid.lambda * 1e9).toFixed(1)} nm, ${run.design.polarization.kind} pair, light ${LIGHT_SIDE_LABELS[run.design.setup.lightFrom]}`,
    `Atom library: ${run.library.name} (${run.library.atoms.length} atoms${run.library.approximate ? ', APPROXIMATE' : ''})`,
    '',
  ];
  for (const c of CHANNEL_IDS) {
    lines.push(...formatGroup(`Channel ${c.toUpperCase()} — ${run.channels[c].plan.label}`, run.metrics.channels[c]), '');
  }
  lines.push(...formatGroup(INPUT_NAMES.extra, run.metrics.extraInput), '');
  lines.push(...formatGroup('Atom mapping', run.metrics.mapping), '');
  lines.push(...formatGroup('Design rules', run.metrics.designRules), '');
  if (CHANNEL_IDS.some((c) => run.channels[c].beam || run.channels[c].focus)) {
    lines.push('Laser safety: Bessel and focused beams concentrate power; follow ANSI Z136.1 / IEC 60825-1 and your laser safety officer.', '');
  }
  lines.push(`Files in ${outDir}:`);
  const nameWidth = Math.max(20, ...files.map((f) => f.name.length));
  for (const f of files) lines.push(`  ${f.name.padEnd(nameWidth)} ${formatBytes(f.bytes).padStart(10)}`);
  lines.push(
    '',
    `Time: ${(timings.total / 1000).toFixed(2)} s (inputs ${(timings.inputs / 1000).toFixed(2)} s, engine ${(timings.engine / 1000).toFixed(2)} s, outputs ${(timings.outputs / 1000).toFixed(2)} s)`,
  );
  return lines.join('\n');
}

/** Progress lines on stderr: rewritten in place on a terminal, otherwise one line per stage or ≥ 5 % / 2 s. */
function progressPrinter(stream: NodeJS.WriteStream) {
  const tty = stream.isTTY === true;
  let lastStage = '';
  let lastPercent = -100;
  let lastTime = 0;
  const channelText = new Map<number, string>();
  return {
    update(fraction: number, stage: string, detail?: Record<string, number>) {
      const percent = Math.floor(100 * fraction);
      if (detail && detail.channel !== undefined && detail.iteration !== undefined) {
        const total = detail.channelFraction > 0 ? `/${Math.round(detail.iteration / detail.channelFraction)}` : '';
        channelText.set(
          detail.channel,
          `${detail.channel === 0 ? 'A' : 'B'} it ${detail.iteration}${total} error ${detail.fourierError.toFixed(4)} window ${(100 * detail.windowEfficiency).toFixed(1)} %`,
        );
      }
      const text = `[${String(percent).padStart(3)}%] ${stage}${stage === 'phase retrieval' ? ' — ' + [...channelText.entries()].sort((a, b) => a[0] - b[0]).map(([, t]) => t).join(' · ') : ''}`;
      const now = Date.now();
      if (tty) {
        if (now - lastTime > 80 || stage !== lastStage) {
          stream.write(`\r\x1b[2K${text}`);
          lastTime = now;
        }
      } else if (stage !== lastStage || percent >= lastPercent + 5 || now - lastTime > 2000) {
        stream.write(`${text}\n`);
        lastPercent = percent;
        lastTime = now;
      }
      lastStage = stage;
    },
    done() {
      if (tty) stream.write('\r\x1b[2K');
    },
  };
}

/** Runs the command line with `argv` (without node and script); returns the exit code. */
export async function main(argv: string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs(argv);
  } catch (error) {
    process.stderr.write(`phasewright: ${(error as Error).message}\n`);
    return 2;
  }
  if (parsed.help) {
    process.stdout.write(`${USAGE}\n`);
    return 0;
  }
  if ('library' in parsed) return libraryBuildCommand(parsed.library);
  const { design, out, sequential, tilesMaxSide } = parsed.run;
  const controller = new AbortController();
  const onSigint = () => controller.abort(new Error('interrupted'));
  process.once('SIGINT', onSigint);
  const progress = progressPrinter(process.stderr);
  try {
    const result = await runDesignFile(design, {
      outDir: out,
      parallel: !sequential,
      tiles: tilesMaxSide === null ? null : { maxSide: tilesMaxSide },
      signal: controller.signal,
      onProgress: (fraction, stage, detail) => progress.update(fraction, stage, detail),
      onWarning: (message) => process.stderr.write(`phasewright: note: ${message}\n`),
    });
    progress.done();
    process.stdout.write(`${summary(result, resolve(out))}\n`);
    return 0;
  } catch (error) {
    progress.done();
    if (error instanceof InputError || error instanceof DesignUnitsError) {
      process.stderr.write(`phasewright: ${error.message}\n`);
      return 2;
    }
    if (controller.signal.aborted) {
      process.stderr.write('phasewright: interrupted\n');
      return 130;
    }
    process.stderr.write(`phasewright: the run failed: ${error instanceof Error ? error.message : String(error)}\n`);
    if (process.env.PHASEWRIGHT_DEBUG && error instanceof Error && error.stack) process.stderr.write(`${error.stack}\n`);
    return 1;
  } finally {
    process.off('SIGINT', onSigint);
  }
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  process.exitCode = await main(process.argv.slice(2));
}
