/**
 * Child process of the end-to-end benchmark (bench/run.ts): runs one design file through the command
 * line's own code path (server/cli/run-design-file.ts) and prints one JSON line with the timings, the
 * process's peak resident set size (VmHWM of /proc/self/status) and the highest resident set size seen
 * during each stage (VmRSS sampled every 20 ms by a thread of its own, so it goes on while the engine holds
 * this thread), so each measurement starts from a fresh process.
 * Usage: node --import tsx bench/design-run-child.ts DESIGN.json OUT_DIR [--sequential]
 */
import { readFileSync } from 'node:fs';
import { Worker } from 'node:worker_threads';
import { runDesignFile } from '../server/cli/run-design-file';

const [designPath, outDir, mode] = process.argv.slice(2);
if (!designPath || !outDir) throw new Error('usage: design-run-child.ts DESIGN.json OUT_DIR [--sequential]');

/** KiB of a field of /proc/self/status (VmRSS, VmHWM). */
function statusKiB(field: string): number {
  const match = new RegExp(`^${field}:\\s+(\\d+) kB`, 'm').exec(readFileSync('/proc/self/status', 'utf8'));
  return match ? Number(match[1]) : NaN;
}

// [0]: highest VmRSS (KiB) since the last stage change; [1]: 1 while sampling.
const shared = new Int32Array(new SharedArrayBuffer(8));
shared[1] = 1;
const sampler = new Worker(
  `const { workerData } = require('node:worker_threads');
   const { readFileSync } = require('node:fs');
   const s = workerData;
   const sleeper = new Int32Array(new SharedArrayBuffer(4));
   while (Atomics.load(s, 1) === 1) {
     const m = /^VmRSS:\\s+(\\d+) kB/m.exec(readFileSync('/proc/self/status', 'utf8'));
     if (m) { const v = Number(m[1]); let old; while ((old = Atomics.load(s, 0)) < v && Atomics.compareExchange(s, 0, old, v) !== old); }
     Atomics.wait(sleeper, 0, 0, 20);
   }`,
  { eval: true, workerData: shared },
);

const stagePeakKiB: Record<string, number> = {};
let stage = 'reading inputs';
/** Closes the current stage's peak and opens the next one's at the present resident size. */
function nextStage(name: string) {
  const peak = Atomics.exchange(shared, 0, statusKiB('VmRSS'));
  stagePeakKiB[stage] = Math.max(stagePeakKiB[stage] ?? 0, peak);
  stage = name;
}

const result = await runDesignFile(designPath, {
  outDir,
  parallel: mode !== '--sequential',
  onProgress: (_fraction, name) => {
    if (name !== stage) nextStage(name);
  },
});
nextStage('done');
Atomics.store(shared, 1, 0);
await sampler.terminate();
const bytes = result.files.reduce((s, f) => s + f.bytes, 0);
process.stdout.write(
  `${JSON.stringify({
    timings: result.timings,
    stages: result.run.timings,
    stagePeakKiB,
    files: result.files.length,
    bytes,
    maxRssKiB: Math.max(process.resourceUsage().maxRSS, statusKiB('VmHWM') || 0),
    efficiencyA: result.run.metrics.channels.a.efficiency?.value ?? null,
  })}\n`,
);
