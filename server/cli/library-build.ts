/**
 * `phasewright library build SPEC.json --out atoms.csv`: computes a meta-atom library by RCWA from a build spec
 * (shared/optics/library-builder.ts) and writes it as atoms.csv (the format `parseAtomLibraryCsv` reads), with a
 * second file beside it, `<out>.powers.csv`, holding each atom's zeroth-order and other-order powers.
 * Sequential, on one thread (no --threads yet). Progress on stderr; exit codes as `run`.
 */
import { readFile, writeFile, mkdir } from 'node:fs/promises';
import { dirname, resolve } from 'node:path';
import { atomLibraryToCsv, checkAtomLibrary } from '../../shared/optics/atoms';
import { buildAtomLibrary, LibrarySpecError, parseLibrarySpec, type BuiltAtomPowers } from '../../shared/optics/library-builder';
import { InputError } from './design-files';

export interface LibraryBuildArgs {
  spec: string;
  out: string;
}

/** Parses the arguments after `library build`. Throws InputError saying what is missing. */
export function parseLibraryBuildArgs(rest: string[]): LibraryBuildArgs {
  let spec: string | undefined;
  let out: string | undefined;
  for (let i = 0; i < rest.length; i++) {
    const arg = rest[i];
    if (arg === '--out' || arg === '-o') {
      out = rest[++i];
      if (!out) throw new InputError('--out needs a file name, e.g. --out atoms.csv');
    } else if (arg.startsWith('--out=')) out = arg.slice('--out='.length);
    else if (arg.startsWith('-')) throw new InputError(`unknown option '${arg}' (try: phasewright --help)`);
    else if (spec === undefined) spec = arg;
    else throw new InputError(`unexpected argument '${arg}': give one spec file`);
  }
  if (!spec) throw new InputError('library build needs a spec file: phasewright library build SPEC.json --out atoms.csv');
  if (!out) throw new InputError('library build needs --out FILE.csv');
  return { spec, out };
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
    resolved = parseLibrarySpec(json);
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
  process.stderr.write(`library build: ${n} × ${n} = ${n * n} atoms at ${h}×${h} harmonics, one thread\n`);
  let lastPercent = -100;
  let lastTime = 0;
  try {
    const built = await buildAtomLibrary(resolved, {
      signal: controller.signal,
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
        `Time: ${(built.secondsPerAtom * 1000).toFixed(1)} ms per atom`,
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
  }
}
