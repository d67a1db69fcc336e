import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeNpy } from '../../shared/optics/npy';
import { decodeNpy } from '../../shared/optics/npy-decode';
import { PYTHON } from '../support/python';

const dir = mkdtempSync(join(tmpdir(), 'phasewright-npy-read-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('.npy reader (NEP 1, numpy.lib.format)', () => {
  it('reads back what npy.ts writes (f8, f4, i4, u1)', () => {
    const f8 = Float64Array.from({ length: 12 }, (_, i) => Math.sin(i) * 1e3);
    const back = decodeNpy(encodeNpy(f8, [3, 4]));
    expect(back.descr).toBe('<f8');
    expect(back.shape).toEqual([3, 4]);
    expect(Array.from(back.data)).toEqual(Array.from(f8));
    expect(Array.from(decodeNpy(encodeNpy(Int32Array.of(-5, 7), [2])).data)).toEqual([-5, 7]);
    expect(decodeNpy(encodeNpy(Float32Array.of(0.5), [1, 1])).data).toBeInstanceOf(Float32Array);
    expect(Array.from(decodeNpy(encodeNpy(Uint8Array.of(1, 255), [2])).data)).toEqual([1, 255]);
  });

  it('reads files numpy writes: C and Fortran order, big-endian, int16, format version 2.0', () => {
    // numpy is the independent writer here; values are a.ravel(order='C').
    const script = `
import numpy as np, sys, json
d = sys.argv[1]
a = (np.arange(12, dtype=np.float64).reshape(3, 4) * 0.25 - 1)
np.save(d + '/c.npy', a)
np.save(d + '/f.npy', np.asfortranarray(a))
np.save(d + '/be.npy', a.astype('>f4'))
np.save(d + '/i2.npy', (a * 8).astype(np.int16))
with open(d + '/v2.npy', 'wb') as f:
    np.lib.format.write_array(f, a, version=(2, 0))
print(json.dumps(a.ravel(order='C').tolist()))`;
    const expected = JSON.parse(execFileSync(PYTHON, ['-c', script, dir]).toString()) as number[];
    for (const [name, descr] of [
      ['c', '<f8'],
      ['f', '<f8'],
      ['be', '>f4'],
      ['v2', '<f8'],
    ] as const) {
      const decoded = decodeNpy(readFileSync(join(dir, `${name}.npy`)));
      expect(decoded.descr).toBe(descr);
      expect(decoded.shape).toEqual([3, 4]);
      expect(Array.from(decoded.data)).toEqual(expected);
    }
    const i2 = decodeNpy(readFileSync(join(dir, 'i2.npy')));
    expect(i2.data).toBeInstanceOf(Int16Array);
    expect(Array.from(i2.data)).toEqual(expected.map((v) => Math.trunc(v * 8)));
  });

  it('rejects what it cannot read with a RangeError', () => {
    expect(() => decodeNpy(new Uint8Array(20))).toThrow(RangeError);
    const truncated = encodeNpy(Float64Array.of(1, 2, 3), [3]).slice(0, -8);
    expect(() => decodeNpy(truncated)).toThrow(/data holds/);
    const dict = new TextEncoder().encode("{'descr': '|O', 'fortran_order': False, 'shape': (1,), }\n");
    const object = new Uint8Array(10 + dict.length + 8);
    object.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0, dict.length, 0]);
    object.set(dict, 10);
    expect(() => decodeNpy(object)).toThrow(/not a plain number type/);
  });
});
