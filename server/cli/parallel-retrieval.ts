/**
 * Phase retrieval of the hologram channels on worker threads, one thread per channel, so two channels
 * use both cores (measured ≥ 1.8× the throughput of one thread, bench/run.ts). Plugs into
 * `runDesign` as `resources.retrieveChannels`. Workers may be started ahead ("warm"), so that loading their
 * modules and the FFT overlaps with reading the inputs. Cancellation terminates the workers.
 */
import type { Worker } from 'node:worker_threads';
import type { RetrievalResult } from '../../shared/optics/gerchberg-saxton';
import type { ChannelRetriever, RetrievalHooks, RetrievalJob } from '../../shared/optics/pipeline';

import { startTsWorker } from './ts-worker';

const WORKER_FILE = new URL('./retrieval-worker.ts', import.meta.url);

type WorkerMessage =
  | { type: 'progress'; fraction: number; detail?: Record<string, number> }
  | { type: 'done'; result: RetrievalResult }
  | { type: 'error'; message: string; refused: boolean };

/** A started retrieval worker, with what became of it before it got a job. */
interface RetrievalThread {
  worker: Worker;
  /** Set when the worker failed or stopped while waiting. */
  early: Error | null;
}

function startThread(): RetrievalThread {
  const thread: RetrievalThread = { worker: startTsWorker(WORKER_FILE, null), early: null };
  thread.worker.on('error', (error) => (thread.early ??= error));
  thread.worker.on('exit', (code) => (thread.early ??= new Error(`a phase retrieval worker stopped before its job (exit code ${code})`)));
  return thread;
}

function runJob(thread: RetrievalThread, job: RetrievalJob, index: number, hooks: RetrievalHooks): Promise<RetrievalResult> {
  const { worker } = thread;
  return new Promise<RetrievalResult>((resolve, reject) => {
    let settled = false;
    const finish = (error: unknown, result?: RetrievalResult) => {
      if (settled) return;
      settled = true;
      clearInterval(watch);
      void worker.terminate();
      if (result) resolve(result);
      else reject(error);
    };
    // CancelSignal has no events: poll it.
    const watch = setInterval(() => {
      if (!hooks.signal?.aborted) return;
      try {
        hooks.signal.throwIfAborted();
        finish(new Error('Cancelled'));
      } catch (error) {
        finish(error);
      }
    }, 50);
    if (thread.early) {
      finish(thread.early);
      return;
    }
    worker.on('message', (message: WorkerMessage) => {
      if (message.type === 'progress') hooks.onProgress?.(index, message.fraction, message.detail);
      else if (message.type === 'done') finish(null, message.result);
      else {
        const text = `Phase retrieval of channel ${job.channel.toUpperCase()} failed: ${message.message}`;
        finish(message.refused ? new RangeError(text) : new Error(text));
      }
    });
    worker.on('error', (error) => finish(error));
    worker.on('exit', (code) => finish(new Error(`Phase retrieval worker of channel ${job.channel.toUpperCase()} stopped (exit code ${code})`)));
    worker.postMessage(job.options);
  });
}

export interface WorkerRetriever {
  /** Runs every job on its own worker thread, all at once (warm workers first). */
  retrieve: ChannelRetriever;
  /** Stops the warm workers no job took. */
  close(): Promise<void>;
}

/** A retriever on worker threads; `warm` workers are started now and wait for their jobs. */
export function createWorkerRetriever(warm = 0): WorkerRetriever {
  const spare = Array.from({ length: warm }, startThread);
  return {
    retrieve: (jobs, hooks) => Promise.all(jobs.map((job, index) => runJob(spare.shift() ?? startThread(), job, index, hooks))),
    async close() {
      await Promise.all(spare.splice(0).map((thread) => thread.worker.terminate()));
    },
  };
}
