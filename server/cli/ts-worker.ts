/**
 * Starts a worker thread on one of our modules, wherever the caller itself runs: the command line (tsx
 * registered in-process by bin/phasewright.mjs), a piscina run worker started with `--import tsx` (where tsx
 * compiles our modules so that `import.meta` has `url` but no `resolve`), vitest, or compiled JavaScript.
 * A `.js` module starts as is. A `.ts` module starts through ts-worker-entry.mjs, which imports it with tsx's
 * `tsImport`: on Node 20 an `--import tsx` in a worker's execArgv does not reach the worker's ES-module
 * loading (only its `require`, which cannot load our modules with top-level await).
 */
import { Worker } from 'node:worker_threads';

const TS_ENTRY = new URL('./ts-worker-entry.mjs', import.meta.url);

/** A worker thread running the module at `file` (.ts or .js) with `workerData`. */
export function startTsWorker(file: URL, workerData: unknown): Worker {
  if (!file.pathname.endsWith('.ts')) return new Worker(file, { workerData });
  return new Worker(TS_ENTRY, { workerData, argv: [file.href] });
}
