/**
 * What a piscina pool needs to start a worker file wherever the server runs: under tsx (and vitest) the
 * worker file is TypeScript and its thread needs the tsx loader (`--import tsx`); compiled, it is plain .js.
 */

/** The worker module next to `base` named `name` (.ts when the caller itself is TypeScript, else .js). */
export function workerFile(name: string, base: string): URL {
  return new URL(`./${name}${base.endsWith('.ts') ? '.ts' : '.js'}`, base);
}

/** execArgv for a pool thread of `file`: the parent's, plus the tsx loader for a TypeScript worker. */
export function workerExecArgv(file: URL): string[] {
  const argv = process.execArgv;
  if (!file.pathname.endsWith('.ts')) return argv;
  const hasTsx = argv.some((arg, i) => (arg === '--import' || arg === '--loader') && /tsx/.test(argv[i + 1] ?? ''));
  return hasTsx ? argv : [...argv, '--import', 'tsx'];
}
