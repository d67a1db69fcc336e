/**
 * `npm run bench:large`: the memory the web server takes for what follows a large run: its fab package, and a
 * tolerance study (bias and detuning sweep) on its run pool.
 *
 * Starts the real server on loopback (bench/lib/stack.ts), saves the twin-image demo at N² cells (default 4096,
 * 2 iterations per channel) as a revision of the demo project, runs it on the server's own run pool and waits
 * for it; records an owner's override when the run has design-rule violations (the package refuses otherwise);
 * then downloads `fab-package.zip` twice — as stored, and with another GDSII layer so the layout is written again
 * on the layout worker — reading /proc/<server>/status every 50 ms meanwhile. Prints, per download, the zip's
 * size and time, the server's resident set before it and its highest value during it (VmRSS samples), and the
 * difference. Target (issue 15): the GDSII and the fab package streamed with ≤ 256 MB above the arrays.
 * Then a tolerance study of the run with the default sweeps over the whole device: its time and the server's
 * highest resident set meanwhile, beside the run's own estimate (shared/optics/run-memory.ts), which the server
 * uses as the study's estimate against RUN_MEMORY_BUDGET_MB.
 *
 * Options: `--cells N` (4096), `--iterations K` (2). Needs about 4 GB of memory for the run at 4096².
 */
import { readFileSync } from 'node:fs';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../server/db/seed-demo';
import { estimateRunMemory } from '../shared/optics/run-memory';
import { loadAverage, runBenchmark, Session, sleep, startBenchStack } from './lib/stack';

function option(name: string, fallback: number): number {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? Number(process.argv[i + 1]) : fallback;
}
const CELLS = option('cells', 4096);
const ITERATIONS = option('iterations', 2);
const MIB = 1024 * 1024;

function residentMiB(pid: number): number {
  const match = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
  return match ? Number(match[1]) / 1024 : NaN;
}

async function download(base: string, cookie: string, path: string, pid: number) {
  const before = residentMiB(pid);
  let peak = before;
  const sampler = setInterval(() => (peak = Math.max(peak, residentMiB(pid))), 50);
  const t0 = performance.now();
  const res = await fetch(base + path, { headers: { cookie } });
  if (!res.ok || !res.body) throw new Error(`GET ${path}: ${res.status} ${await res.text()}`);
  let bytes = 0;
  // Read and drop: only the size matters here.
  for await (const chunk of res.body) bytes += (chunk as Uint8Array).byteLength;
  const seconds = (performance.now() - t0) / 1000;
  clearInterval(sampler);
  peak = Math.max(peak, residentMiB(pid));
  return { bytes, seconds, before, peak };
}

async function main() {
  if (!(Number.isInteger(CELLS) && CELLS >= 64 && CELLS <= 4096) || !(Number.isInteger(ITERATIONS) && ITERATIONS >= 1)) {
    throw new RangeError('--cells must be an integer in [64, 4096] and --iterations a positive integer');
  }
  const { base, server } = await startBenchStack('fab');
  const pid = server.pid!;
  const owner = DEMO_PEOPLE.find((p) => p.key === 'tomas')!;
  const session = new Session(base);
  await session.signIn(owner.email, DEMO_PASSWORD);

  // The demo project's latest revision (the twin image), at CELLS² cells and few iterations.
  const revisions = (await session.call('GET', '/api/projects/1/revisions')).revisions as { number: number }[];
  const source = (await session.call('GET', `/api/projects/1/revisions/${revisions[revisions.length - 1].number}`)).revision.design as Record<string, any>;
  const design: Record<string, any> = { ...source, setup: { ...source.setup, cells: CELLS } };
  for (const channel of Object.values(design.channels ?? {}) as { terms?: Record<string, any>[] }[]) {
    for (const term of channel.terms ?? []) if (term.iterations) term.iterations = ITERATIONS;
  }
  const revision = (await session.call('POST', '/api/projects/1/revisions', { design, message: `Fab package benchmark: ${CELLS}²` })).revision.number as number;
  console.log(`Server on ${base}; running revision ${revision} (${CELLS}² cells, ${ITERATIONS} iterations per channel)`);
  const t0 = performance.now();
  let run = (await session.call('POST', `/api/projects/1/revisions/${revision}/runs`)).run as { id: number; status: string; error: string | null };
  let runPeak = 0;
  while (!['succeeded', 'failed', 'cancelled'].includes(run.status)) {
    await sleep(1000);
    runPeak = Math.max(runPeak, residentMiB(pid));
    run = (await session.call('GET', `/api/projects/1/runs/${run.id}`)).run;
  }
  if (run.status !== 'succeeded') throw new Error(`Run ${run.id} ${run.status}: ${run.error}`);
  console.log(`Run ${run.id} finished in ${((performance.now() - t0) / 1000).toFixed(0)} s (server's resident set up to ${runPeak.toFixed(0)} MiB while it ran)`);

  const check = (await session.call('GET', `/api/projects/1/runs/${run.id}/design-check`)) as Record<string, any>;
  const violations = Number(check.check?.total ?? check.total ?? 0);
  if (violations > 0) {
    await session.call('POST', `/api/projects/1/runs/${run.id}/export-override`, { reason: 'Fab package benchmark: memory of the download only' });
  }
  console.log(`Design-rule violations: ${violations}${violations ? ' (exported under an override)' : ''}`);

  const layer = Number(design.layout?.layer ?? 1);
  for (const [label, query] of [
    ['as stored', ''],
    ['GDSII written again (another layer)', `?layer=${layer === 1 ? 2 : 1}`],
  ] as const) {
    // Let the heap settle after the run or the last download.
    await sleep(5000);
    const d = await download(base, session.cookie, `/api/projects/1/runs/${run.id}/fab-package.zip${query}`, pid);
    const line =
      `${label}: ${(d.bytes / MIB).toFixed(0)} MiB zip in ${d.seconds.toFixed(1)} s; server resident ${d.before.toFixed(0)} MiB before, ` +
      `up to ${d.peak.toFixed(0)} MiB during (+${(d.peak - d.before).toFixed(0)} MiB); load average ${loadAverage()}`;
    console.log(line);
  }
  console.log(`Target: ≤ 256 MB above the arrays (${CELLS}² cells).`);

  await sleep(5000);
  const restBefore = residentMiB(pid);
  let studyPeak = restBefore;
  const s0 = performance.now();
  let study = (await session.call('POST', `/api/projects/1/runs/${run.id}/tolerance`, {})).study as { status: string; error: string | null };
  while (study.status === 'queued' || study.status === 'running') {
    await sleep(200);
    studyPeak = Math.max(studyPeak, residentMiB(pid));
    study = (await session.call('GET', `/api/projects/1/runs/${run.id}/tolerance`)).study;
  }
  if (study.status !== 'succeeded') throw new Error(`The tolerance study ${study.status}: ${study.error}`);
  const estimate = estimateRunMemory(design as Parameters<typeof estimateRunMemory>[0], { tilesMaxSide: 4096 }).mib;
  console.log(
    `\nTolerance study (default sweeps, whole device): ${((performance.now() - s0) / 1000).toFixed(0)} s; server resident ${restBefore.toFixed(0)} MiB before, ` +
      `up to ${studyPeak.toFixed(0)} MiB during (+${(studyPeak - restBefore).toFixed(0)} MiB); the run's estimate ${estimate} MiB; load average ${loadAverage()}`,
  );
}

runBenchmark(main);
