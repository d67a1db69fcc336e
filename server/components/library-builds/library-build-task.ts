/**
 * The library-build worker (a task of the run pool's worker threads, run-queue.ts): sweeps the spec's pillars
 * by RCWA with the command line's code (buildAtomLibrary; with `lanes` > 1 on the command line's helper threads,
 * server/cli/library-worker.ts), computes the convergence report of three pillars and the proposed subset,
 * and reads the library back through the CSV reader uploads go through, so the server stores it exactly as an
 * uploaded atoms.csv. Progress goes to the main thread through the task's MessagePort at most every 150 ms.
 * Never touches the database. Aborting the task ends its thread, and with it the helper threads.
 */
import type { MessagePort } from 'node:worker_threads';
import { atomLibraryToCsv, type MetaAtom } from '../../../shared/optics/atoms';
import {
  buildAtomLibrary,
  CHECKED_SPEC, parseLibrarySpec, storedAtoms,
  proposeSubset,
  specCell,
  type BuiltLibrary,
  type LibrarySpec,
  type ResolvedSpec,
} from '../../../shared/optics/library-builder';
import { computeAtom } from '../../../shared/optics/rcwa';
import type { LibraryBuildProgress, LibraryBuildResult, LibraryBuildScope } from '../../../shared/schemas/library-builds';
import { libraryWorkerPool } from '../../cli/library-build';
import { readAtomLibraryCsv, type CsvUploadLimits, type StorableLibrary } from '../atom-libraries/atom-library-csv';
import { lowerPoolThreadPriority } from '../runs/run-worker';
import { convergenceLadder, convergenceSizeIndices } from './library-build-cost';

export interface LibraryBuildTask {
  buildId: number;
  spec: LibrarySpec;
  scope: LibraryBuildScope;
  /** The library's name (at most 120 characters). */
  name: string;
  subsetSize: number | null;
  /** Threads computing atoms: 1 on this thread, more on helper threads. */
  lanes: number;
  port: MessagePort;
}

export type LibraryBuildMessage = { type: 'started' } | { type: 'progress'; progress: LibraryBuildProgress; stage: string };

export type LibraryBuildTaskResult =
  /** `library` null: the atoms cannot make an atom library (`refusal` says why); the result is kept for the plots. */
  | { ok: true; library: StorableLibrary | null; refusal: string | null; result: LibraryBuildResult }
  | { ok: false; message: string; detail?: string };

const PROGRESS_INTERVAL_MS = 150;

/** The program wrote the file itself: read without the upload limits (as atoms.ts reads its own files). */
const OWN_FILE: CsvUploadLimits = { maxBytes: Infinity, maxRows: Infinity, maxColumns: Infinity, maxLineChars: Infinity, maxIssues: Infinity };
const nm = (metres: number) => Math.round(metres * 1e13) / 1e4;

/** The convergence report: each pillar at every harmonic count of the ladder, the build's own count taken from the sweep. */
function convergenceReport(r: ResolvedSpec, built: BuiltLibrary): LibraryBuildResult['convergence'] {
  const n = r.sizes.length;
  const ladder = convergenceLadder(r.spec.harmonics);
  return convergenceSizeIndices(n).map((i) => {
    const size = r.sizes[i];
    const own = built.library.atoms[i * n + i];
    const rows = ladder.slice(0, -1).map((harmonics) => {
      const res = computeAtom(specCell(r, size, size), { lambda: r.lambda, harmonics, illumination: r.spec.illumination });
      return { harmonics, tx: res.tx, alphaX: res.alphaX, ty: res.ty, alphaY: res.alphaY };
    });
    rows.push({ harmonics: r.spec.harmonics, tx: own.tx, alphaX: own.alphaX, ty: own.ty, alphaY: own.alphaY });
    return { atomId: own.id, widthNm: nm(size), lengthNm: nm(size), rows };
  });
}

/**
 * What the plots need: sizes, per-atom transmission and powers, convergence, and the subset proposed among
 * `stored` (the atoms the library keeps: `storedAtoms`).
 */
function resultOf(r: ResolvedSpec, built: BuiltLibrary, stored: MetaAtom[], subsetSize: number | null): LibraryBuildResult {
  const atoms = built.library.atoms.map((a, i) => ({
    ...built.powers[i],
    widthNm: nm(a.width),
    lengthNm: nm(a.length),
    tx: a.tx,
    alphaX: a.alphaX,
    ty: a.ty,
    alphaY: a.alphaY,
  }));
  const subset = subsetSize === null ? null : proposeSubset(stored, subsetSize).map((i) => stored[i].id);
  return { sizesNm: r.sizes.map(nm), atoms, convergence: convergenceReport(r, built), subset, storedCount: stored.length };
}

export default async function libraryBuildTask(task: LibraryBuildTask): Promise<LibraryBuildTaskResult> {
  lowerPoolThreadPriority();
  const { port } = task;
  const post = (message: LibraryBuildMessage) => port.postMessage(message);
  post({ type: 'started' });
  const resolved = parseLibrarySpec(task.spec, CHECKED_SPEC);
  const total = resolved.sizes.length ** 2;
  const lanes = Math.max(1, Math.min(task.lanes, total));
  const pool = lanes > 1 ? libraryWorkerPool(resolved.spec, lanes) : undefined;
  try {
    let lastPost = 0;
    const built = await buildAtomLibrary(resolved, {
      compute: pool?.compute,
      lanes,
      onProgress: (fraction, stage, d) => {
        if (Date.now() - lastPost < PROGRESS_INTERVAL_MS && d.atom !== d.atoms) return;
        lastPost = Date.now();
        post({ type: 'progress', stage, progress: { atom: d.atom, atoms: d.atoms, fraction, secondsPerAtom: d.secondsPerAtom } });
      },
    });
    built.library.name = task.name;
    post({
      type: 'progress',
      stage: 'convergence report',
      progress: { atom: total, atoms: total, fraction: 1, secondsPerAtom: built.secondsPerAtom },
    });
    const storedList = storedAtoms(resolved, built.library.atoms);
    const result = resultOf(resolved, built, storedList, task.subsetSize);
    // Read back as an uploaded atoms.csv is: the stored library is the one a download of it gives back.
    const stored = { ...built.library, atoms: storedList };
    const reading = readAtomLibraryCsv(Buffer.from(atomLibraryToCsv(stored), 'utf8'), { name: task.name, scope: task.scope, material: '', wavelengthNm: undefined, periodNm: undefined, heightNm: undefined }, OWN_FILE);
    // Atoms whose phases leave a gap runs cannot fill: refused as the same file uploaded would be.
    const refusal = reading.library ? null : reading.problems.map((p) => p.message).join('; ') || 'the library could not be read back';
    return { ok: true, library: reading.library, refusal, result };
  } catch (error) {
    const err = error instanceof Error ? error : new Error(String(error));
    return { ok: false, message: err.message, detail: err.stack };
  } finally {
    await pool?.close();
    port.close();
  }
}
