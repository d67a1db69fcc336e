/**
 * The production path: the project's files with `npm ci --omit=dev` (no test or build tools) must run the
 * command line on the Bessel demo and load every server module. A run-time import of a development-only
 * package (e.g. `bessel` in the beam analysis) fails here.
 */
import { execFileSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const root = fileURLToPath(new URL('../..', import.meta.url));
const LEFT_OUT = new Set(['node_modules', '.git', '.data', '.artifacts', 'dist', 'tests', 'src', 'bench', 'coverage']);

describe('production install (npm ci --omit=dev)', () => {
  let dir = '';

  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'pw-production-'));
    cpSync(root, dir, {
      recursive: true,
      filter: (source) => {
        const top = relative(root, source).split(/[\\/]/)[0];
        return !LEFT_OUT.has(top);
      },
    });
    // From npm's cache, filled by the test command's own `npm ci`; no install scripts, as in production.
    execFileSync('npm', ['ci', '--omit=dev', '--ignore-scripts', '--prefer-offline', '--no-audit', '--no-fund', '--loglevel=error'], {
      cwd: dir,
      stdio: 'pipe',
      timeout: 240_000,
    });
  }, 300_000);

  afterAll(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  }, 120_000);

  it('installs no package that the lock file marks development-only', () => {
    const lock = JSON.parse(readFileSync(join(root, 'package-lock.json'), 'utf8')) as { packages: Record<string, { dev?: boolean }> };
    const devOnly = Object.entries(lock.packages).filter(([path, entry]) => entry.dev && path.startsWith('node_modules/') && !path.includes('/node_modules/', 1));
    expect(devOnly.length).toBeGreaterThan(50);
    expect(devOnly.map(([path]) => path).filter((path) => existsSync(join(dir, path)))).toEqual([]);
  });

  it('runs the Bessel and vortex demo through the command line', () => {
    const out = join(dir, 'out');
    execFileSync(process.execPath, ['bin/phasewright.mjs', 'run', 'demo-assets/designs/bessel-vortex.json', '--out', out], { cwd: dir, stdio: 'pipe', timeout: 240_000 });
    const metrics = JSON.parse(readFileSync(join(out, 'metrics.json'), 'utf8')) as Record<string, unknown>;
    expect(existsSync(join(out, 'layout.gds'))).toBe(true);
    // The beam analysis (J_ℓ² comparison through the `bessel` package) ran: its figures are in the metrics.
    expect(JSON.stringify(metrics)).toMatch(/ring|core/i);
  }, 240_000);

  it('loads the server and its run worker', () => {
    const script = "await import('./server/app.ts'); await import('./server/components/runs/run-worker.ts'); console.log('loaded');";
    const printed = execFileSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], { cwd: dir, encoding: 'utf8', timeout: 120_000 });
    expect(printed.trim()).toBe('loaded');
  }, 120_000);
});
