import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeNpy, npyChunks, npyHeader } from '../../shared/optics/npy';
import type { NpyArray } from '../../shared/optics/npy';
import { PYTHON } from '../support/python';

const dir = mkdtempSync(join(tmpdir(), 'phasewright-npy-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** numpy.load each file and report dtype, shape and values as JSON (numpy is the reference reader). */
function loadWithNumpy(paths: string[]): { dtype: string; shape: number[]; values: number[] }[] {
  const script = `
import json, sys, numpy as np
out = []
for p in sys.argv[1:]:
    a = np.load(p, allow_pickle=False)
    out.append({'dtype': a.dtype.str, 'shape': list(a.shape), 'values': a.ravel(order='C').astype(float).tolist()})
print(json.dumps(out))`;
  return JSON.parse(execFileSync(PYTHON, ['-c', script, ...paths], { maxBuffer: 64 << 20 }).toString());
}

describe('.npy v1.0 encoder (NEP 1, numpy.lib.format)', () => {
  it('writes f4, f8, i4, u1 arrays of 1, 2 and 3 dimensions that numpy loads with the same dtype, shape and values', () => {
    const cases: { data: NpyArray; shape: number[]; dtype: string }[] = [
      { data: Float64Array.from({ length: 12 }, (_, i) => Math.PI * (i - 5) * 1e-3), shape: [3, 4], dtype: '<f8' },
      { data: Float32Array.from({ length: 6 }, (_, i) => i / 3 - 0.7), shape: [2, 3], dtype: '<f4' },
      { data: Int32Array.from({ length: 10 }, (_, i) => (i - 4) * 100000), shape: [10], dtype: '<i4' },
      { data: Uint8Array.from({ length: 24 }, (_, i) => (i * 11) % 256), shape: [2, 3, 4], dtype: '|u1' },
      { data: Float64Array.of(-0.0, Number.MAX_VALUE, 5e-324), shape: [3], dtype: '<f8' },
      { data: Float64Array.from({ length: 64 * 64 }, (_, i) => Math.sin(i)), shape: [64, 64], dtype: '<f8' },
    ];
    const paths = cases.map((c, i) => {
      const path = join(dir, `case-${i}.npy`);
      writeFileSync(path, encodeNpy(c.data, c.shape));
      return path;
    });
    const loaded = loadWithNumpy(paths);
    cases.forEach((c, i) => {
      expect(loaded[i].dtype).toBe(c.dtype);
      expect(loaded[i].shape).toEqual(c.shape);
      expect(loaded[i].values).toEqual(Array.from(c.data, Number));
    });
  });

  it('pads the header so that the data starts on a 64-byte boundary and ends it with a newline', () => {
    for (const shape of [[1], [7, 9], [2048, 2048], [1, 2, 3, 4, 5]]) {
      const count = shape.reduce((p, d) => p * d, 1);
      const header = npyHeader(new Float32Array(count), shape);
      expect(header.length % 64).toBe(0);
      expect(header[header.length - 1]).toBe(0x0a);
      expect(Array.from(header.subarray(0, 8))).toEqual([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0]);
      expect(header[8] | (header[9] << 8)).toBe(header.length - 10);
      const text = new TextDecoder().decode(header.subarray(10));
      expect(text).toContain(`'shape': (${shape.join(', ')}${shape.length === 1 ? ',' : ''})`);
    }
  });

  it('streams header and data without copying and rejects a wrong shape', () => {
    const data = new Int32Array([1, 2, 3, 4]);
    const [header, body] = npyChunks(data, [2, 2]);
    // 10 bytes of preamble + the 60-character dict + '\n' exceed 64, so the header fills 128 bytes.
    expect(header.length).toBe(128);
    expect(body.buffer).toBe(data.buffer);
    expect(() => encodeNpy(data, [3])).toThrow(RangeError);
    expect(() => encodeNpy(data, [2, -2])).toThrow(RangeError);
  });
});
