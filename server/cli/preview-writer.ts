/**
 * A preview writer on its own worker thread (preview-worker.ts), started ahead of time so its modules are
 * loaded while the engine runs; it paints and encodes the PNG previews while the main thread writes the
 * arrays and the layout. The data are copied to the worker (structured clone), the run keeps its arrays.
 */
import type { Worker } from 'node:worker_threads';
import type { PreviewWriter } from './outputs';
import type { PreviewData, PreviewSelection, WrittenFile } from './previews';
import { startTsWorker } from './ts-worker';

const WORKER_FILE = new URL('./preview-worker.ts', import.meta.url);

export interface PreviewWorker extends PreviewWriter {
  /** Stops the worker (after a failed run, or when no previews were asked for). */
  close(): Promise<void>;
}

type Reply = { type: 'ready' } | { type: 'done'; files: WrittenFile[] } | { type: 'error'; message: string };

/** Starts the worker now; `write` may be called once. */
export function startPreviewWorker(): PreviewWorker {
  const worker: Worker = startTsWorker(WORKER_FILE, null);
  let failure: Error | null = null;
  worker.on('error', (error) => {
    failure = error;
  });
  return {
    write(dir: string, data: PreviewData, selection: PreviewSelection): Promise<WrittenFile[]> {
      return new Promise<WrittenFile[]>((resolve, reject) => {
        if (failure) {
          reject(failure);
          return;
        }
        const onMessage = (reply: Reply) => {
          if (reply.type === 'ready') return;
          worker.off('message', onMessage);
          void worker.terminate();
          if (reply.type === 'done') resolve(reply.files);
          else reject(new Error(`Writing the previews failed: ${reply.message}`));
        };
        worker.on('message', onMessage);
        worker.once('error', reject);
        worker.once('exit', (code) => reject(new Error(`The preview worker stopped (exit code ${code})`)));
        worker.postMessage({ dir, data, selection });
      });
    },
    async close() {
      await worker.terminate();
    },
  };
}
