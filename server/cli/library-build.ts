/**
 * `phasewright library build SPEC.json --out atoms.csv`: computes a meta-atom library by RCWA from a build spec
 * (shared/optics/library-builder.ts) and writes it as atoms.csv (the format `parseAtomLibraryCsv` reads), with a
 * second file beside it, `<out>.powers.csv`, holding each atom's zeroth-order and other-order powers.
 * On this thread, or with `--threads N` on N worker threads (library-worker.ts), one atom per worker at a time.
 * Progress on stderr; exit codes as `run`.
 */
import { readFile, writeFile, mkdir } from 'node:fs/promises';
import { basename, dirname, extname, resolve } from 'node:path';
import { atomLibraryToCsv, checkAtomLibrary } from '../../shared/optics/atoms';
import { buildAtomLibrary, LibrarySpecError, parseLibrarySpec, type BuiltAtomPowers, type LibrarySpec, type SweepAtom } from '../../shared/optics/library-builder';
import { NkTableError, parseNkTableCsv, type NkTable } from '../../shared/optics/nk-table';
import { InputError } from './design-files';
import { startTsWorker } from './ts-worker';

/** Most worker threads `--threads` may ask for. */
const MAX_THREADS = 16;

export interface LibraryBuildArgs {
  spec: string;
  out: string;
  /** Worker threads; 1: compute on the main thread. */
  threads: number;
}

/** Parses the arguments after `library build`. Throws InputError saying what is missing. */
export function parseLibraryBuildArgs(rest: string[]): LibraryBuildArgs {
  let spec: string | undefined;
  let out: string | undefined;
  let threads = 1;
  const threadCount = (text: string | undefined): number => {
    const v = Number(text);
    if (!Number.isInteger(v) || v < 1 || v > MAX_THREADS) throw new InputError(`--threads needs a whole number from 1 to ${MAX_THREADS}, got ${text ?? 'nothing'}`);
    return v;
  };
  for (let i = 0; i < rest.length; i++) {
    const arg = rest[i];
    if (arg === '--threads') threads = threadCount(rest[++i]);
    else if (arg.startsWith('--threads=')) threads = threadCount(arg.slice('--threads='.length));
    else if (arg === '--out' || arg === '-o') {
      out = rest[++i];
      if (!out) throw new InputError('--out needs a file name, e.g. --out atoms.csv');
    } else if (arg.startsWith('--out=')) out = arg.slice('--out='.length);
    else if (arg.startsWith('-')) throw new InputError(`unknown option '${arg}' (try: phasewright --help)`);
    else if (spec === undefined) spec = arg;
    else throw new InputError(`unexpected argument '${arg}': give one spec file`);
  }
  if (!spec) throw new InputError('library build needs a spec file: phasewright library build SPEC.json --out atoms.csv');
  if (!out) throw new InputError('library build needs --out FILE.csv');
  return { spec, out, threads };
}

/**
 * `count` worker threads computing sweep atoms of `spec`; compute(index, lane) runs on worker `lane`. Also the
 * lanes of a library build on the run workers (server/components/library-builds/library-build-task.ts).
 */
export function libraryWorkerPool(spec: LibrarySpec, count: number) {
  const pending = new Map<number, { resolve: (r: SweepAtom) => void; reject: (e: Error) => void }>();
  let nextId = 0;
  const workers = Array.from({ length: count }, () => {
    const worker = startTsWorker(new URL('./library-worker.ts', import.meta.url), { spec });
    worker.on('message', (m: { id: number; type: 'done'; result: SweepAtom } | { id: number; type: 'error'; message: string }) => {
      const p = pending.get(m.id);
      pending.delete(m.id);
      if (m.type === 'done') p?.resolve(m.result);
      else p?.reject(new Error(m.message));
    });
    worker.on('error', (error) => {
      for (const p of pending.values()) p.reject(error);
      pending.clear();
    });
    return worker;
  });
  return {
    compute: (index: number, lane: number): Promise<SweepAtom> =>
      new Promise((resolve, reject) => {
        const id = nextId++;
        pending.set(id, { resolve, reject });
        workers[lane].postMessage({ id, index });
      }),
    close: () => Promise.all(workers.map((w) => w.terminate())),
  };
}

/**
 * Replaces each material given as { "nkCsv": "file.csv", "name"?: …, "source"?: … } (path relative to the spec's
 * folder) by the tabulated material the spec format holds, { name, source, table }. Throws InputError naming the
 * field and the file.
 */
export async function readNkCsvMaterials(json: unknown, folder: string): Promise<unknown> {
  if (json === null || typeof json !== 'object' || Array.isArray(json)) return json;
  const out: Record<string, unknown> = { ...(json as Record<string, unknown>) };
  for (const field of ['pillar', 'substrate', 'superstrate']) {
    const value = out[field];
    if (value === null || typeof value !== 'object' || !('nkCsv' in value)) continue;
    const o = value as Record<string, unknown>;
    const extra = Object.keys(o).filter((key) => !['nkCsv', 'name', 'source'].includes(key));
    if (extra.length > 0) throw new InputError(`${field}: unknown key ${extra.join(', ')} beside nkCsv (give nkCsv, and optionally name and source)`);
    if (typeof o.nkCsv !== 'string' || o.nkCsv === '') throw new InputError(`${field}.nkCsv: give the path of an n, k table (CSV: wavelength_nm,n,k), relative to the spec`);
    const file = resolve(folder, o.nkCsv);
    let text: string;
    try {
      text = await readFile(file, 'utf8');
    } catch (error) {
      throw new InputError(`${field}.nkCsv: cannot read ${file} (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})`);
    }
    let table: NkTable;
    try {
      table = parseNkTableCsv(text);
    } catch (error) {
      if (error instanceof NkTableError) throw new InputError(`${field}.nkCsv: ${file}, ${error.message}`);
      throw error;
    }
    out[field] = {
      name: typeof o.name === 'string' ? o.name : table.name || basename(file, extname(file)),
      source: typeof o.source === 'string' ? o.source : table.source || `n, k table ${basename(file)}`,
      table: table.points,
    };
  }
  return out;
}

function powersCsv(powers: BuiltAtomPowers[]): string {
  const lines = ['atom_id,zero_order_T_x,zero_order_T_y,other_orders_T_x,other_orders_T_y,R_x,R_y'];
  for (const p of powers) lines.push([p.id, p.zeroOrderX, p.zeroOrderY, p.otherOrdersX, p.otherOrdersY, p.reflectedX, p.reflectedY].join(','));
  return lines.join('\n') + '\n';
}

/** Runs `library build`; returns the exit code (0 done, 1 failed, 2 bad input, 130 interrupted). */
export async function libraryBuildCommand(args: LibraryBuildArgs): Promise<number> {
  let resolved;
  try {
    let text: string;
    try {
      text = await readFile(args.spec, 'utf8');
    } catch (error) {
      throw new InputError(`cannot read the spec file ${args.spec}: ${(error as NodeJS.ErrnoException).code ?? (error as Error).message}`);
    }
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch (error) {
      throw new InputError(`${args.spec} is not valid JSON: ${(error as Error).message}`);
    }
    resolved = parseLibrarySpec(await readNkCsvMaterials(json, dirname(resolve(args.spec))));
  } catch (error) {
    if (error instanceof InputError) process.stderr.write(`phasewright: ${error.message}\n`);
    else if (error instanceof LibrarySpecError) {
      process.stderr.write(`phasewright: ${args.spec} has ${error.problems.length === 1 ? 'a problem' : `${error.problems.length} problems`}:\n`);
      for (const p of error.problems) process.stderr.write(`  ${p.field}: ${p.message}\n`);
    } else throw error;
    return 2;
  }
  const controller = new AbortController();
  const onSigint = () => controller.abort(new Error('interrupted'));
  process.once('SIGINT', onSigint);
  const n = resolved.sizes.length;
  const h = resolved.spec.harmonics;
  const threads = Math.min(args.threads, n * n);
  process.stderr.write(`library build: ${n} × ${n} = ${n * n} atoms at ${h}×${h} harmonics, ${threads > 1 ? `${threads} worker threads` : 'one thread'}\n`);
  const pool = threads > 1 ? libraryWorkerPool(resolved.spec, threads) : undefined;
  let lastPercent = -100;
  let lastTime = 0;
  try {
    const built = await buildAtomLibrary(resolved, {
      signal: controller.signal,
      compute: pool?.compute,
      lanes: threads,
      onProgress: (fraction, _stage, d) => {
        const percent = Math.floor(100 * fraction);
        const now = Date.now();
        if (d.atom === 1 || d.atom === d.atoms || percent >= lastPercent + 5 || now - lastTime > 2000) {
          const left = (d.atoms - d.atom) * d.secondsPerAtom;
          process.stderr.write(`[${String(percent).padStart(3)}%] atom ${d.atom}/${d.atoms}, ${(d.secondsPerAtom * 1000).toFixed(0)} ms per atom, about ${left.toFixed(0)} s left\n`);
          lastPercent = percent;
          lastTime = now;
        }
      },
    });
    for (const w of built.warnings) process.stderr.write(`phasewright: warning: ${w}\n`);
    // The library's own checks (e.g. phase coverage of a coarse sweep): said, not fatal — the file is still written.
    for (const issue of checkAtomLibrary(built.library).issues) process.stderr.write(`phasewright: note: ${issue.message}\n`);
    const out = resolve(args.out);
    await mkdir(dirname(out), { recursive: true });
    await writeFile(out, atomLibraryToCsv(built.library));
    const powersOut = out.replace(/\.csv$/i, '') + '.powers.csv';
    await writeFile(powersOut, powersCsv(built.powers));
    const zero = built.powers.map((p) => (p.zeroOrderX + p.zeroOrderY) / 2);
    const other = built.powers.map((p) => (p.otherOrdersX + p.otherOrdersY) / 2);
    process.stdout.write(
      [
        `Library "${built.library.name}": ${built.library.atoms.length} atoms, not approximate`,
        `Source: ${built.library.source}`,
        `Zeroth-order transmittance ${Math.min(...zero).toFixed(3)}–${Math.max(...zero).toFixed(3)}; power in other orders up to ${Math.max(...other).toFixed(3)}`,
        `Time: ${(built.secondsPerAtom * 1000).toFixed(1)} ms per atom (wall time${threads > 1 ? ` on ${threads} threads` : ''})`,
        `Wrote ${out}`,
        `Wrote ${powersOut}`,
      ].join('\n') + '\n',
    );
    return 0;
  } catch (error) {
    if (controller.signal.aborted) {
      process.stderr.write('phasewright: interrupted\n');
      return 130;
    }
    process.stderr.write(`phasewright: the library build failed: ${error instanceof Error ? error.message : String(error)}\n`);
    return 1;
  } finally {
    process.off('SIGINT', onSigint);
    await pool?.close();
  }
}
