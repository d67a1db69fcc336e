/**
 * Worker thread of `phasewright library build --threads N`: resolves the spec it is given (workerData.spec) and
 * computes sweep atoms on request. Messages in: { id, index }; out: { id, type: 'done', result: SweepAtom } or
 * { id, type: 'error', message }.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { computeSweepAtom, CHECKED_SPEC, parseLibrarySpec } from '../../shared/optics/library-builder';

if (!parentPort) throw new Error('library-worker.ts runs as a worker thread only');
const port = parentPort;
const resolved = parseLibrarySpec((workerData as { spec: unknown }).spec, CHECKED_SPEC);

port.on('message', ({ id, index }: { id: number; index: number }) => {
  try {
    port.postMessage({ id, type: 'done', result: computeSweepAtom(resolved, index) });
  } catch (error) {
    port.postMessage({ id, type: 'error', message: error instanceof Error ? error.message : String(error) });
  }
});
