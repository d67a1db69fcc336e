/**
 * The helper threads of one run, the same for `phasewright run` and the server's run worker: the hologram
 * channels' phase retrieval on one worker thread each (parallel-retrieval.ts), then, once retrieval has freed
 * its core, a preview worker that paints the PNGs while the caller writes the arrays and the layout
 * (preview-writer.ts). Without helpers everything stays on the caller's thread.
 */
import type { ChannelRetriever } from '../../shared/optics/pipeline';
import { createWorkerRetriever } from './parallel-retrieval';
import { startPreviewWorker, type PreviewWorker } from './preview-writer';

export interface RunThreads {
  /** For `resources.retrieveChannels`; undefined: retrieve on the caller's thread. */
  retrieveChannels: ChannelRetriever | undefined;
  /** Call with the stage of every progress report: starts the preview worker when retrieval is over. */
  onStage(stage: string): void;
  /** The preview writer for `writeRunOutputs`, once started. */
  previews(): PreviewWorker | undefined;
  /** Stops the preview worker (always call it, after success or failure). */
  close(): Promise<void>;
}

/** Helper threads for one run when `parallel`; none otherwise. */
export function runThreads(parallel: boolean): RunThreads {
  let previews: PreviewWorker | undefined;
  return {
    retrieveChannels: parallel ? createWorkerRetriever() : undefined,
    onStage(stage) {
      if (parallel && !previews && stage !== 'prepare' && stage !== 'phase retrieval') previews = startPreviewWorker();
    },
    previews: () => previews,
    async close() {
      await previews?.close();
    },
  };
}
