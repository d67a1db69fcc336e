/**
 * Worker thread that paints and writes PNG previews of a run (previews.ts) while the main thread writes
 * the arrays and the layout. Message in: { dir, data: PreviewData, selection }; out:
 * { type: 'ready' } once loaded, then { type: 'done', files } or { type: 'error', message }. One job per worker.
 */
import { parentPort } from 'node:worker_threads';
import { encodePng } from './png';
import { writePreviews, type PreviewData, type PreviewSelection } from './previews';

// Load jimp now, while the engine still runs on the main thread.
await encodePng({ width: 1, height: 1, data: new Uint8ClampedArray(4) });

if (!parentPort) throw new Error('preview-worker.ts runs as a worker thread only');
const port = parentPort;
port.once('message', async ({ dir, data, selection }: { dir: string; data: PreviewData; selection: PreviewSelection }) => {
  try {
    port.postMessage({ type: 'done', files: await writePreviews(dir, data, selection) });
  } catch (error) {
    port.postMessage({ type: 'error', message: error instanceof Error ? error.message : String(error) });
  }
});
port.postMessage({ type: 'ready' });
