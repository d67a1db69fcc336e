/**
 * An output helper on its own worker thread (output-worker.ts), started ahead of time so its modules are
 * loaded while the engine runs; it writes the layout files while the engine simulates, then paints the
 * far-field previews while the engine checks the design rules and computes the metrics. The arrays are copied into shared memory
 * (shared-copies.ts) and passed to the worker without serializing them; the run keeps its own arrays.
 */
import type { Worker } from 'node:worker_threads';
import type { LayoutFilesData, OutputHelper } from './outputs';
import type { OutputJob } from './output-worker';
import type { RunFarFields } from '../../shared/optics/pipeline';
import type { WrittenFile } from './previews';
import type { TileOptions } from './tiles';
import { shareArrays } from './shared-copies';
import { startTsWorker } from './ts-worker';

const WORKER_FILE = new URL('./output-worker.ts', import.meta.url);

export interface OutputWorker extends OutputHelper {
  /** Stops the worker; jobs still pending fail. */
  close(): Promise<void>;
}

type Reply = { type: 'ready' } | { id: number; type: 'done'; files: WrittenFile[] } | { id: number; type: 'error'; message: string };

/** Starts the worker now; jobs may be sent at once (they wait for it to load). */
export function startOutputWorker(): OutputWorker {
  const worker: Worker = startTsWorker(WORKER_FILE, null);
  const pending = new Map<number, { resolve: (files: WrittenFile[]) => void; reject: (error: Error) => void }>();
  let failure: Error | null = null;
  let nextId = 1;
  const failAll = (error: Error) => {
    failure ??= error;
    for (const job of pending.values()) job.reject(error);
    pending.clear();
  };
  worker.on('message', (reply: Reply) => {
    if (reply.type === 'ready') return;
    const job = pending.get(reply.id);
    if (!job) return;
    pending.delete(reply.id);
    if (reply.type === 'done') job.resolve(reply.files);
    else job.reject(new Error(`Writing the files of the run failed: ${reply.message}`));
  });
  worker.on('error', (error) => failAll(error));
  worker.on('exit', (code) => failAll(new Error(`The output worker stopped (exit code ${code})`)));
  const send = (job: Omit<OutputJob, 'id'>): Promise<WrittenFile[]> =>
    new Promise<WrittenFile[]>((resolve, reject) => {
      if (failure) {
        reject(failure);
        return;
      }
      const id = nextId++;
      pending.set(id, { resolve, reject });
      worker.postMessage({ ...job, data: shareArrays(job.data), id });
    });
  return {
    writeLayout: (dir: string, data: LayoutFilesData, tiles?: TileOptions | null) => send({ job: 'layout', dir, data, tiles }),
    writeFarFieldPreviews: (dir: string, data: RunFarFields, tiles?: TileOptions | null) => send({ job: 'far fields', dir, data, tiles }),
    async close() {
      await worker.terminate();
    },
  };
}
