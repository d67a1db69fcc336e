/**
 * Worker thread that writes files of a run while the main thread goes on (output-helper.ts): the layout files
 * once the atoms are mapped, the far-field previews once the far fields are simulated. Jobs are done one at a
 * time, in the order they come. Messages in: { id, job: 'layout', dir, data: LayoutFilesData } or { id, job:
 * 'far fields', dir, data: RunFarFields }; out: { type: 'ready' } once loaded, then per job { id, type: 'done',
 * files } or { id, type: 'error', message }.
 */
import { parentPort } from 'node:worker_threads';
import type { RunFarFields } from '../../shared/optics/pipeline';
import { writeFarFieldPreviews, writeLayoutFiles, type LayoutFilesData } from './outputs';
import { encodePng } from './png';
import type { WrittenFile } from './previews';
import type { TileOptions } from './tiles';

export type OutputJob = { id: number; dir: string; tiles?: TileOptions | null } & ({ job: 'layout'; data: LayoutFilesData } | { job: 'far fields'; data: RunFarFields });

// Load the PNG encoder now, while the engine still runs on the main thread.
await encodePng({ width: 1, height: 1, data: new Uint8ClampedArray(4) });

if (!parentPort) throw new Error('output-worker.ts runs as a worker thread only');
const port = parentPort;
let queue: Promise<void> = Promise.resolve();

function perform(job: OutputJob): Promise<WrittenFile[]> {
  return job.job === 'layout' ? writeLayoutFiles(job.dir, job.data, job.tiles) : writeFarFieldPreviews(job.dir, job.data, job.tiles);
}

port.on('message', (job: OutputJob) => {
  queue = queue.then(async () => {
    try {
      port.postMessage({ id: job.id, type: 'done', files: await perform(job) });
    } catch (error) {
      port.postMessage({ id: job.id, type: 'error', message: error instanceof Error ? error.message : String(error) });
    }
  });
});
port.postMessage({ type: 'ready' });
