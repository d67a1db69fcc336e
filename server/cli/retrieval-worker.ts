/**
 * Worker thread of the parallel phase retrieval: loads the FFT backend for this thread, waits for one job
 * (a message holding the channel's RetrievalJobOptions), runs its GS / weighted GS / MRAF (`retrievePhase`) and
 * posts its progress and result to the parent (parallel-retrieval.ts). Messages out: { type: 'progress',
 * fraction, detail } … then { type: 'done', result } with the result's buffers transferred, or
 * { type: 'error', message, refused } (refused: the engine's RangeError).
 */
import { parentPort } from 'node:worker_threads';
import { retrievePhase } from '../../shared/optics/gerchberg-saxton';
import type { RetrievalJobOptions } from '../../shared/optics/pipeline';
import { initFftInNode } from '../lib/fft-node';

if (!parentPort) throw new Error('retrieval-worker.ts runs as a worker thread only');
const port = parentPort;
const ready = initFftInNode();
// A failed load is reported with the job (below), not as an unhandled rejection.
ready.catch(() => undefined);
port.once('message', async (options: RetrievalJobOptions) => {
  try {
    await ready;
    const result = retrievePhase({
      ...options,
      onProgress: (fraction, _stage, detail) => port.postMessage({ type: 'progress', fraction, detail }),
    });
    // A phase in shared memory is passed by reference; the other buffers move without a copy.
    const arrays = [result.phase, result.fourierError, result.windowError, result.windowEfficiency];
    const buffers = arrays.map((a) => a.buffer).filter((b): b is ArrayBuffer => !(b instanceof SharedArrayBuffer));
    port.postMessage({ type: 'done', result }, buffers);
  } catch (error) {
    // The engine refuses bad values with a RangeError; keep that kind so the caller can show it as the user's to fix.
    const refused = error instanceof RangeError;
    port.postMessage({ type: 'error', message: error instanceof Error ? error.message : String(error), refused });
  }
});
