/**
 * The tolerance worker (a task of the run pool's worker threads, run-queue.ts): rebuilds a finished run's
 * realized device from its stored arrays, design and atom library, and sweeps it through size biases and
 * detunings (shared/optics/tolerance.ts). Resources are resolved as the run worker does (uploads written
 * into the task's folder, the command line's loader), so the target windows are the run's own. Progress goes
 * to the main thread through the task's MessagePort at most every 150 ms. Never touches the database.
 */
import { mkdir } from 'node:fs/promises';
import { join } from 'node:path';
import type { MessagePort } from 'node:worker_threads';
import type { AtomLibrary } from '../../../shared/optics/atoms';
import { decodeNpy } from '../../../shared/optics/npy-decode';
import { planChannel, type DesignResources } from '../../../shared/optics/pipeline';
import { responseModelFor, runToleranceStudy, toleranceSetupOf, type ToleranceResults } from '../../../shared/optics/tolerance';
import type { Design } from '../../../shared/schemas/design';
import type { ToleranceRequestBody } from '../../../shared/schemas/tolerance';
import { loadDesignResources } from '../../cli/design-files';
import { designErrorMessage } from '../runs/run-outcome';
import type { RunTaskUpload } from '../runs/run-task';
import { designWithUploadFiles, lowerPoolThreadPriority } from '../runs/run-worker';

/** The stored arrays a study reads, by artifact name. */
export const TOLERANCE_ARRAYS = ['atom_index.npy', 'delta_x.npy', 'delta_y.npy', 'theta.npy', 'phase_a.npy', 'phase_b.npy'] as const;
export type ToleranceArrayName = (typeof TOLERANCE_ARRAYS)[number];

export interface ToleranceTask {
  studyId: number;
  /** The design as the run used it (its design.json). */
  design: Design;
  uploads: RunTaskUpload[];
  /** The run's own atoms.csv, for a design whose library is stored on the server. */
  atomLibrary: { id: number; library: AtomLibrary } | null;
  /** The run's .npy files. */
  arrays: Record<ToleranceArrayName, Uint8Array>;
  request: ToleranceRequestBody;
  workDir: string;
  port: MessagePort;
}

export type ToleranceMessage = { type: 'started' } | { type: 'progress'; fraction: number; stage: string };

export type ToleranceTaskResult = { ok: true; results: ToleranceResults } | { ok: false; designProblem: boolean; message: string; detail?: string };

const PROGRESS_INTERVAL_MS = 150;

function array<T extends Float64Array | Int32Array>(task: ToleranceTask, name: ToleranceArrayName, kind: new (n: number) => T): T {
  const decoded = decodeNpy(task.arrays[name]);
  if (!(decoded.data instanceof kind)) throw new RangeError(`the run's ${name} holds ${decoded.descr} values, not the ${kind.name} the study needs`);
  return decoded.data as T;
}

export default async function toleranceTask(task: ToleranceTask): Promise<ToleranceTaskResult> {
  lowerPoolThreadPriority();
  const { port } = task;
  const post = (message: ToleranceMessage) => port.postMessage(message);
  post({ type: 'started' });
  let replacements: [string, string][] = [];
  try {
    const inputs = join(task.workDir, 'inputs');
    await mkdir(inputs, { recursive: true });
    const prepared = await designWithUploadFiles(task, inputs);
    replacements = prepared.replacements;
    const loaded = await loadDesignResources(prepared.design, join(inputs, 'design.json'));
    const resources: Pick<DesignResources, 'images' | 'phaseMaps'> = {
      images: (ref) => loaded.resources.images(prepared.resolve(ref)),
      phaseMaps: (ref) => loaded.resources.phaseMaps(prepared.resolve(ref)),
    };
    const library = loaded.resources.library;
    const plans = { a: planChannel(task.design, 'a', resources), b: planChannel(task.design, 'b', resources) };
    post({ type: 'progress', fraction: 0, stage: 'rebuilding the device' });
    const setup = toleranceSetupOf(
      task.design,
      plans,
      {
        atomIndex: array(task, 'atom_index.npy', Int32Array),
        decomposition: {
          n: task.design.setup.cells,
          deltaX: array(task, 'delta_x.npy', Float64Array),
          deltaY: array(task, 'delta_y.npy', Float64Array),
          theta: array(task, 'theta.npy', Float64Array),
        },
        phases: { a: array(task, 'phase_a.npy', Float64Array), b: array(task, 'phase_b.npy', Float64Array) },
      },
      library,
    );
    let lastPost = 0;
    let lastStage = '';
    const results = await runToleranceStudy(setup, responseModelFor(task.design, library), task.request, {
      onProgress: (fraction, stage) => {
        if (stage !== lastStage || Date.now() - lastPost >= PROGRESS_INTERVAL_MS || fraction === 1) {
          post({ type: 'progress', fraction, stage });
          lastPost = Date.now();
          lastStage = stage;
        }
      },
    });
    return { ok: true, results };
  } catch (error) {
    const message = designErrorMessage(error, task.design, replacements);
    if (message) return { ok: false, designProblem: true, message };
    const err = error instanceof Error ? error : new Error(String(error));
    return { ok: false, designProblem: false, message: err.message, detail: err.stack };
  } finally {
    port.close();
  }
}
