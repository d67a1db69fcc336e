/**
 * Worker thread of the parallel phase retrieval: loads the FFT backend for this thread, runs one channel's
 * GS / weighted GS / MRAF (`retrievePhase`) and posts its progress and result to the parent
 * (parallel-retrieval.ts). Messages: { type: 'progress', fraction, detail } … then { type: 'done', result }
 * with the result's buffers transferred, or { type: 'error', message, refused } (refused: the engine's RangeError).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { initFft } from '../../shared/optics/fft';
import { retrievePhase } from '../../shared/optics/gerchberg-saxton';
import type { RetrievalJobOptions } from '../../shared/optics/pipeline';

if (!parentPort) throw new Error('retrieval-worker.ts runs as a worker thread only');
const port = parentPort;
try {
  await initFft();
  const result = retrievePhase({
    ...(workerData as RetrievalJobOptions),
    onProgress: (fraction, _stage, detail) => port.postMessage({ type: 'progress', fraction, detail }),
  });
  const buffers = [result.phase, result.fourierError, result.windowError, result.windowEfficiency].map((a) => a.buffer as ArrayBuffer);
  port.postMessage({ type: 'done', result }, buffers);
} catch (error) {
  // The engine refuses bad values with a RangeError; keep that kind so the caller can show it as the user's to fix.
  const refused = error instanceof RangeError;
  port.postMessage({ type: 'error', message: error instanceof Error ? error.message : String(error), refused });
}
