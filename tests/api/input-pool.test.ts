/**
 * The input pool's own limits, on real worker threads: a task past its time is stopped (422), a task that finds
 * the pool and its queue full is turned away (503), a thread past its heap limit is stopped (413).
 */
import { afterEach, describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';
import { createInputPool, type InputPool } from '../../server/lib/input-pool';
import { atomLibraryToCsv } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { progressiveJpegManyScans } from '../support/hostile-corpus';

let pool: InputPool | null = null;
afterEach(async () => {
  await pool?.close();
  pool = null;
});

function poolWith(env: Record<string, string>): InputPool {
  pool = createInputPool(loadConfig({ NODE_ENV: 'test', ...env }));
  return pool;
}

/** A 4096² progressive JPEG within the scan limit: jpeg-js walks the whole plane per scan (about a second here). */
const slowJpeg = progressiveJpegManyScans(100);

describe('input pool limits', () => {
  it('stops a decode past UPLOAD_DECODE_TIMEOUT_MS with 422', async () => {
    const inputs = poolWith({ UPLOAD_DECODE_TIMEOUT_MS: '100' });
    await expect(inputs.checkUpload(slowJpeg, 'image')).rejects.toMatchObject({ status: 422, message: expect.stringMatching(/took longer than 0.1 s and was stopped/) });
    expect(inputs.state().running).toBe(0);
  });

  it('turns a task away with 503 when every thread and queue place is taken', async () => {
    const inputs = poolWith({ UPLOAD_DECODE_THREADS: '1', UPLOAD_DECODE_QUEUE: '0' });
    const first = inputs.checkUpload(slowJpeg, 'image').catch((e: unknown) => e);
    await new Promise((r) => setTimeout(r, 50));
    await expect(inputs.checkUpload(slowJpeg, 'image')).rejects.toMatchObject({ status: 503, message: expect.stringMatching(/upload again in a minute/) });
    expect((await first) as { status: number }).toMatchObject({ status: 400 });
  });

  it('stops a thread that runs out of heap (UPLOAD_DECODE_HEAP_MIB) with 413', async () => {
    const inputs = poolWith({ UPLOAD_DECODE_HEAP_MIB: '16', ATOM_CSV_MAX_MIB: '16' });
    const lib = demoAtomLibrary();
    const atoms = Array.from({ length: 20_000 }, (_, i) => ({ ...lib.atoms[i % lib.atoms.length], id: `atom-${i}-${'x'.repeat(150)}` }));
    const csv = Buffer.from(atomLibraryToCsv({ ...lib, atoms }));
    await expect(inputs.readAtomLibraryCsv(csv, { name: '', scope: 'project', material: '' } as never)).rejects.toMatchObject({
      status: 413,
      message: expect.stringMatching(/needed more than 16 MiB of memory/),
    });
  });
});
