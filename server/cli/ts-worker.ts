/**
 * Starts a worker thread on a TypeScript module. `--import tsx` in the parent does not reach worker
 * threads, so a small ES-module bootstrap loads the file through tsx's `tsImport`.
 */
import { Worker } from 'node:worker_threads';

/** A worker running the TypeScript module at `file` with `workerData`. */
export function startTsWorker(file: URL, workerData: unknown): Worker {
  const api = import.meta.resolve('tsx/esm/api');
  const source = `import { tsImport } from ${JSON.stringify(api)}; await tsImport(${JSON.stringify(file.href)}, ${JSON.stringify(import.meta.url)});`;
  return new Worker(new URL(`data:text/javascript,${encodeURIComponent(source)}`), { workerData });
}
