/**
 * One design through the server's run path — the run queue's piscina pool and run worker
 * (server/components/runs/run-queue.ts, run-worker.ts) — without a database: the design file is validated
 * as a revision would be, handed to the pool as a RunTask, and the wall time from submission to result is
 * printed with the worker's stage timings and the process's peak resident set (VmHWM). As in the server, the pool
 * threads get the run memory budget as their heap limit (RUN_MEMORY_BUDGET_MB) and runs write tile pyramids
 * (PREVIEW_TILES_MAX_SIDE).
 * Default design: the twin-image demo (two 1024² hologram channels).
 * Usage: node --import tsx bench/server-run.ts [DESIGN.json] [--threads N] [--sequential | --parallel]
 * (helper threads inside the run: the queue's default for N pool threads unless forced; N defaults to 1).
 */
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { MessageChannel } from 'node:worker_threads';
import { readFileSync } from 'node:fs';
import { loadDesignFile } from '../server/cli/design-files';
import { loadConfig } from '../server/config';
import { createRunPool, parallelWithinRuns } from '../server/components/runs/run-queue';

const args = process.argv.slice(2);
const threadsAt = args.indexOf('--threads');
const threads = threadsAt >= 0 ? Number(args[threadsAt + 1]) : 1;
const parallel = args.includes('--sequential') ? false : args.includes('--parallel') ? true : parallelWithinRuns(threads);
const designPath =
  args.find((a, i) => !a.startsWith('--') && (threadsAt < 0 || i !== threadsAt + 1)) ?? fileURLToPath(new URL('../demo-assets/designs/twin-image.json', import.meta.url));

const design = await loadDesignFile(designPath);
const config = loadConfig();
const pool = createRunPool(threads, 0, config.RUN_MEMORY_BUDGET_MB);
// As the server's queue does: tile pyramids up to PREVIEW_TILES_MAX_SIDE (0: none).
const tiles = config.PREVIEW_TILES_MAX_SIDE > 0 ? { maxSide: config.PREVIEW_TILES_MAX_SIDE } : null;
const workDir = await mkdtemp(join(tmpdir(), 'phasewright-server-run-'));
try {
  const { port1, port2 } = new MessageChannel();
  const t0 = performance.now();
  const result = await pool.run({ runId: 0, design, uploads: [], workDir, port: port2, parallel, tiles }, { transferList: [port2] });
  const wallMs = performance.now() - t0;
  port1.close();
  if (!result.ok) throw new Error(`the run failed: ${result.message}\n${result.detail ?? ''}`);
  const timings = (result.plots as { timingsMs: Record<string, number> }).timingsMs;
  console.log(
    JSON.stringify({
      design: design.name,
      cells: design.setup.cells,
      poolThreads: threads,
      helperThreads: parallel,
      wallMs: Math.round(wallMs),
      stagesMs: Object.fromEntries(Object.entries(timings).map(([k, v]) => [k, Math.round(v)])),
      files: result.files.length,
      bytes: result.files.reduce((s, f) => s + f.bytes, 0),
      peakRssMiB: Math.round(Number(/^VmHWM:\s+(\d+) kB/m.exec(readFileSync('/proc/self/status', 'utf8'))?.[1]) / 1024),
    }),
  );
} finally {
  await pool.destroy();
  await rm(workDir, { recursive: true, force: true });
}
