/**
 * The helper threads of one run, the same for `phasewright run` and the server's run worker: the hologram
 * channels' phase retrieval on one worker thread each (parallel-retrieval.ts), started while the inputs are
 * read; then, once retrieval has freed its core, an output worker (output-helper.ts) that writes the layout
 * files while the engine simulates and the far-field previews while it finishes. Without helpers everything
 * stays on the caller's thread.
 */
import type { ChannelRetriever, DesignRun, RunOptions } from '../../shared/optics/pipeline';
import { startOutputWorker, type OutputWorker } from './output-helper';
import { layoutFilesDataOf, writeRunOutputs, type EarlyFiles, type WrittenFile } from './outputs';
import { createWorkerRetriever } from './parallel-retrieval';
import type { TileOptions } from './tiles';

export interface RunThreads {
  /** For `resources.retrieveChannels`; undefined: retrieve on the caller's thread. */
  retrieveChannels: ChannelRetriever | undefined;
  /** Call with the stage of every progress report: starts the output worker when retrieval is over. */
  onStage(stage: string): void;
  /**
   * For runDesign's options: results in shared memory, and the output worker writes the layout files and the
   * far-field previews into `dir` while the engine goes on.
   */
  earlyOutputs(dir: string): Pick<RunOptions, 'onLayout' | 'onFarFields' | 'memory'>;
  /** Writes every output of the finished run into `dir` (writeRunOutputs), with the output worker's share. */
  writeOutputs(run: DesignRun, dir: string): Promise<WrittenFile[]>;
  /** Stops the output worker (always call it, after success or failure). */
  close(): Promise<void>;
}

/** Retrieval workers started with the run's helpers (one per channel), loading while the inputs are read. */
const WARM_RETRIEVAL_WORKERS = 2;

/**
 * Helper threads for one run when `parallel`; none otherwise. Create it before reading the inputs. With `tiles`
 * the run also writes the tile pyramids of its far fields and maps (tiles.ts).
 */
export function runThreads(parallel: boolean, tiles?: TileOptions | null): RunThreads {
  let helper: OutputWorker | undefined;
  const early: EarlyFiles = {};
  // Observed at once so a run that fails later leaves no unhandled rejection; writeOutputs awaits them.
  const keep = (files: Promise<WrittenFile[]>) => {
    files.catch(() => undefined);
    return files;
  };
  const startHelper = () => (helper ??= startOutputWorker());
  const retriever = parallel ? createWorkerRetriever(WARM_RETRIEVAL_WORKERS) : undefined;
  return {
    retrieveChannels: retriever?.retrieve,
    onStage(stage) {
      if (parallel && stage !== 'prepare' && stage !== 'phase retrieval') startHelper();
    },
    earlyOutputs: (dir) =>
      parallel
        ? {
            memory: 'shared',
            onLayout: (layout) => (early.layout = keep(startHelper().writeLayout(dir, layoutFilesDataOf(layout), tiles))),
            onFarFields: (result) => (early.farFieldPreviews = keep(startHelper().writeFarFieldPreviews(dir, result, tiles))),
          }
        : {},
    writeOutputs: (run, dir) => writeRunOutputs(run, dir, early, tiles),
    async close() {
      await Promise.all([helper?.close(), retriever?.close()]);
    },
  };
}
