/**
 * Child process of the end-to-end benchmark (bench/run.ts): writes a finished run's GDSII again with other
 * options through the layout worker's own code (server/components/fab/layout-task.ts, as a fab package with
 * another layer or database unit does) from the run's files in OUT_DIR, and prints one JSON line: the bytes of
 * the two arrays it reads (atom_index.npy, theta.npy), the resident set before and once they are read, the peak resident
 * set (VmHWM) while the GDSII is streamed, its size and the time taken.
 * Usage: node --import tsx bench/layout-gds-child.ts OUT_DIR
 */
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import layoutTask, { type LayoutData } from '../server/components/fab/layout-task';

const [dir] = process.argv.slice(2);
if (!dir) throw new Error('usage: layout-gds-child.ts OUT_DIR');

const statusKiB = (field: string) => Number(new RegExp(`^${field}:\\s+(\\d+) kB`, 'm').exec(readFileSync('/proc/self/status', 'utf8'))?.[1]);
/** A file in a buffer of its own (as the server reads a stored artifact for the layout worker), not copied again. */
function own(name: string): Uint8Array {
  const bytes = readFileSync(join(dir, name));
  return new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

const baseKiB = statusKiB('VmRSS');
const data: LayoutData = {
  designJson: readFileSync(join(dir, 'design.json'), 'utf8'),
  atomsCsv: readFileSync(join(dir, 'atoms.csv'), 'utf8'),
  atomIndexNpy: own('atom_index.npy'),
  thetaNpy: own('theta.npy'),
};
const arrayBytes = data.atomIndexNpy.length + data.thetaNpy.length;
const withArraysKiB = statusKiB('VmRSS');
const outFile = join(dir, 'layout-regenerated.gds');
const t0 = performance.now();
const result = await layoutTask({ kind: 'gds', runId: 0, key: 'bench', data, options: { layer: 2, datatype: 0, dbUnitNm: 1 }, outFile });
const ms = performance.now() - t0;
if (result.ok !== true || !('gdsBytes' in result)) throw new Error(`GDSII not written: ${JSON.stringify(result)}`);
rmSync(outFile, { force: true });
process.stdout.write(`${JSON.stringify({ arrayBytes, baseKiB, withArraysKiB, peakKiB: statusKiB('VmHWM'), gdsBytes: result.gdsBytes, ms })}\n`);
