/**
 * The run worker (a piscina worker thread): resolves a revision's design (uploads and a stored atom library passed in by the queue,
 * demo pictures and the demo atom library from the repository), runs the engine pipeline `runDesign`, and
 * writes the output files with the command line's writer (server/cli/outputs.ts) into the run's folder,
 * from where the queue stores them in the database. With `task.parallel` the two hologram channels are
 * retrieved on two worker threads of their own and the previews painted on another while the arrays are
 * written (the command line's run-threads.ts); otherwise everything runs on this thread, when the pool's
 * other threads already keep the cores busy (run-queue.ts decides). Progress goes to the main thread through
 * the task's MessagePort, at most every 150 ms and on every stage change. Never touches the database.
 */
import { mkdir, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { Piscina } from 'piscina';
import { atomLibraryToCsv } from '../../../shared/optics/atoms';
import { runDesign, type DesignResources } from '../../../shared/optics/pipeline';
import type { AssetRef, Design } from '../../../shared/schemas/design';
import { loadDesignResources } from '../../cli/design-files';
import { runThreads } from '../../cli/run-threads';
import { initFftInNode } from '../../lib/fft-node';
import { lowerThreadPriority } from '../../lib/thread-priority';
import { EXTENSIONS, type UploadMime } from '../uploads/upload-inspect';
import { convergenceOf, designErrorMessage, headlineOf, metricSections, plotsOf } from './run-outcome';
import type { RunPoolThreadData } from './run-queue';
import type { RunProgressMessage, RunTask, RunTaskResult } from './run-task';

const PROGRESS_INTERVAL_MS = 150;

const refKey = (ref: AssetRef) => JSON.stringify(ref);

/**
 * The design with every upload reference, and a stored atom library, turned into a file reference (written
 * into `folder`), so the command line's resource loader reads it; plus the map back from the original references.
 */
export async function designWithUploadFiles(task: Pick<RunTask, 'design' | 'uploads' | 'atomLibrary'>, folder: string) {
  const files = new Map<number, string>();
  const replacements: [string, string][] = [];
  for (const upload of task.uploads) {
    const file = `upload-${upload.id}.${EXTENSIONS[upload.mime as UploadMime] ?? 'bin'}`;
    await writeFile(join(folder, file), upload.bytes);
    files.set(upload.id, file);
    replacements.push([join(folder, file), `upload ${upload.id} ("${upload.name}")`]);
  }
  const toFile = new Map<string, AssetRef>();
  const swap = (ref: AssetRef): AssetRef => {
    if (ref.source !== 'upload') return ref;
    const path = files.get(ref.id);
    if (!path) throw new RangeError(`upload ${ref.id} was not handed to the worker`);
    const fileRef: AssetRef = { source: 'file', path };
    toFile.set(refKey(ref), fileRef);
    return fileRef;
  };
  const design: Design = structuredClone(task.design);
  for (const channel of ['a', 'b'] as const) {
    design.channels[channel].terms = design.channels[channel].terms.map((term) => {
      if (term.kind === 'hologram') return { ...term, image: swap(term.image) };
      if (term.kind === 'custom') return { ...term, phaseMap: swap(term.phaseMap) };
      return term;
    });
  }
  if (design.atomLibrary.source === 'library') {
    const stored = task.atomLibrary;
    if (!stored || stored.id !== design.atomLibrary.id) throw new RangeError(`atom library ${design.atomLibrary.id} was not handed to the worker`);
    const file = `atom-library-${stored.id}.csv`;
    await writeFile(join(folder, file), atomLibraryToCsv(stored.library));
    design.atomLibrary = { source: 'file', path: file };
    replacements.push([join(folder, file), `atom library ${stored.id} ("${stored.library.name}")`]);
  }
  return { design, replacements, resolve: (ref: AssetRef) => toFile.get(refKey(ref)) ?? ref };
}

let priorityLowered = false;
/** Once per pool thread, before its first task: the nice value its pool asked for (run-queue.ts). */
export function lowerPoolThreadPriority() {
  if (priorityLowered) return;
  priorityLowered = true;
  const data = Piscina.workerData as RunPoolThreadData | undefined;
  if (data?.nice) lowerThreadPriority(data.nice);
}

export default async function runTask(task: RunTask): Promise<RunTaskResult> {
  lowerPoolThreadPriority();
  const { port } = task;
  const post = (message: RunProgressMessage) => port.postMessage(message);
  post({ type: 'started' });
  let replacements: [string, string][] = [];
  const threads = runThreads(task.parallel, task.tiles);
  try {
    await initFftInNode();
    const inputs = join(task.workDir, 'inputs');
    const outDir = join(task.workDir, 'out');
    await mkdir(inputs, { recursive: true });
    await mkdir(outDir, { recursive: true });
    const prepared = await designWithUploadFiles(task, inputs);
    replacements = prepared.replacements;
    const loaded = await loadDesignResources(prepared.design, join(inputs, 'design.json'));
    for (const message of loaded.warnings) post({ type: 'note', message });
    const resources: DesignResources = {
      library: loaded.resources.library,
      images: (ref) => loaded.resources.images(prepared.resolve(ref)),
      phaseMaps: (ref) => loaded.resources.phaseMaps(prepared.resolve(ref)),
      retrieveChannels: threads.retrieveChannels,
    };

    let lastStage = '';
    let lastPost = 0;
    let fresh = { a: [] as number[], b: [] as number[] };
    let latest = { fraction: 0, stage: '' };
    const flush = () => {
      post({ type: 'progress', fraction: latest.fraction, stage: latest.stage, convergence: fresh });
      fresh = { a: [], b: [] };
      lastPost = Date.now();
    };
    const run = await runDesign(task.design, resources, {
      onProgress: (fraction, stage, detail) => {
        threads.onStage(stage);
        latest = { fraction, stage };
        if (detail && detail.fourierError !== undefined && detail.channel !== undefined) {
          (detail.channel === 0 ? fresh.a : fresh.b).push(detail.fourierError);
        }
        if (stage !== lastStage || Date.now() - lastPost >= PROGRESS_INTERVAL_MS) flush();
        lastStage = stage;
      },
      ...threads.earlyOutputs(outDir),
    });
    latest = { fraction: 1, stage: 'writing files' };
    flush();
    const files = await threads.writeOutputs(run, outDir);
    const metrics = metricSections(run);
    return {
      ok: true,
      outDir,
      files: files.map((f) => ({ name: f.name, bytes: f.bytes })),
      metrics,
      headline: headlineOf(metrics),
      plots: plotsOf(run),
      convergence: convergenceOf(run),
    };
  } catch (error) {
    const message = designErrorMessage(error, task.design, replacements);
    if (message) return { ok: false, designProblem: true, message };
    const err = error instanceof Error ? error : new Error(String(error));
    return { ok: false, designProblem: false, message: err.message, detail: err.stack };
  } finally {
    await threads.close();
    port.close();
  }
}
