/**
 * One design file → one folder of results: the code path of `phasewright run` (and of the end-to-end
 * benchmark): read and validate, resolve the referenced files, run the engine with the hologram channels
 * on worker threads (run-threads.ts), write every output.
 */
import { mkdir } from 'node:fs/promises';
import type { DesignRun } from '../../shared/optics/pipeline';
import { runDesign } from '../../shared/optics/pipeline';
import type { CancelSignal, ProgressCallback } from '../../shared/optics/types';
import { loadDesignFile, loadDesignResources } from './design-files';
import type { WrittenFile } from './outputs';
import { initFftInNode } from '../lib/fft-node';
import type { TileOptions } from './tiles';
import { runThreads } from './run-threads';

export interface RunFileOptions {
  outDir: string;
  /**
   * Use worker threads (default true): one per hologram channel's phase retrieval, and one writing files
   * while the engine and this thread go on (run-threads.ts). false: everything on this thread.
   */
  parallel?: boolean;
  /** Also write the tile pyramids of the far fields and maps (tiles.ts); null or absent: none. */
  tiles?: TileOptions | null;
  onProgress?: ProgressCallback;
  /** Problems that do not stop the run (approximate library, wavelength mismatch …). */
  onWarning?: (message: string) => void;
  signal?: CancelSignal;
}

export interface RunFileResult {
  run: DesignRun;
  files: WrittenFile[];
  /** Milliseconds: reading inputs, engine, writing outputs, total. */
  timings: { inputs: number; engine: number; outputs: number; total: number };
}

/** Runs one design file into `options.outDir` (created if missing). Throws InputError for bad input. */
export async function runDesignFile(designPath: string, options: RunFileOptions): Promise<RunFileResult> {
  const t0 = performance.now();
  await initFftInNode();
  const design = await loadDesignFile(designPath);
  // Started before the inputs are read: the retrieval workers load meanwhile.
  const threads = runThreads(options.parallel !== false, options.tiles);
  const onProgress: ProgressCallback = (fraction, stage, detail) => {
    threads.onStage(stage);
    options.onProgress?.(fraction, stage, detail);
  };
  try {
    const { resources, warnings } = await loadDesignResources(design, designPath);
    for (const warning of warnings) options.onWarning?.(warning);
    if (threads.retrieveChannels) resources.retrieveChannels = threads.retrieveChannels;
    await mkdir(options.outDir, { recursive: true });
    const t1 = performance.now();
    const run = await runDesign(design, resources, { onProgress, ...threads.earlyOutputs(options.outDir), signal: options.signal });
    const t2 = performance.now();
    onProgress(1, 'writing files');
    const files = await threads.writeOutputs(run, options.outDir);
    const t3 = performance.now();
    return { run, files, timings: { inputs: t1 - t0, engine: t2 - t1, outputs: t3 - t2, total: t3 - t0 } };
  } finally {
    await threads.close();
  }
}
