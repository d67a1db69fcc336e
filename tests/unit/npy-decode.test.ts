import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeNpy } from '../../shared/optics/npy';
import { decodeNpy, readNpyHeader } from '../../shared/optics/npy-decode';
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

describe('.npy header limits (readNpyHeader)', () => {
  /** A format-2.0 file with a raw header text and `data` bytes. */
  const withHeader = (header: string, data = 0) => {
    const text = new TextEncoder().encode(header);
    const out = new Uint8Array(12 + text.length + data);
    out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 2, 0]);
    new DataView(out.buffer).setUint32(8, text.length, true);
    out.set(text, 12);
    return out;
  };

  it('refuses a header past the cap from its length field, before reading it', () => {
    const huge = new Uint8Array(12);
    huge.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 2, 0]);
    new DataView(huge.buffer).setUint32(8, 16 * 1024 * 1024, true);
    // The file holds none of the 16 MiB it announces: the length alone is refused.
    expect(() => readNpyHeader(huge)).toThrow('npy: the header is 16777216 bytes long; at most 65536 are accepted (numpy writes a few hundred)');
    expect(() => readNpyHeader(withHeader(`{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }${' '.repeat(200)}`, 8), { maxHeaderBytes: 128 })).toThrow(
      /header is 257 bytes long; at most 128/,
    );
  });

  it("reads a 60 KB header of repeated \"'shape':(\" in one pass and names what is wrong", () => {
    const header = `{'descr': '<f8', 'fortran_order': False, ${"'shape':(".repeat(6600)}`;
    expect(header.length).toBeLessThan(65_536);
    expect(() => readNpyHeader(withHeader(header))).toThrow(/npy: the header shape should hold whole numbers \(at character 50\)/);
  });

  it('checks dtype, keys and the data the shape needs before any data is read', () => {
    expect(readNpyHeader(withHeader("{'descr': '<f8', 'fortran_order': True, 'shape': (2, 3), }\n", 48))).toMatchObject({
      descr: '<f8',
      fortranOrder: true,
      shape: [2, 3],
      count: 6,
      itemSize: 8,
      dataOffset: 12 + 59,
    });
    expect(() => readNpyHeader(withHeader("{'descr': '<f8', 'fortran_order': False, 'shape': (4096, 4096), }", 16))).toThrow(
      'npy: data holds 16 bytes, shape (4096, 4096) needs 134217728',
    );
    expect(() => readNpyHeader(withHeader("{'descr': [('a', '<f8')], 'fortran_order': False, 'shape': (1,), }", 8))).toThrow(/structured dtype/);
    expect(() => readNpyHeader(withHeader("{'descr': '<f8', 'descr': '<f4', 'fortran_order': False, 'shape': (1,), }", 8))).toThrow(/repeats the key 'descr'/);
    expect(() => readNpyHeader(withHeader("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), 'extra': 1}", 8))).toThrow(/unexpected key 'extra'/);
    expect(() => readNpyHeader(withHeader("{'descr': '<f8', 'shape': (1,), }", 8))).toThrow(/must give descr, fortran_order and shape/);
    expect(() => readNpyHeader(withHeader("{'descr': '<f2', 'fortran_order': False, 'shape': (1,), }", 8))).toThrow(/not a plain number type/);
    expect(() => readNpyHeader(withHeader("{'descr': '<f8', 'fortran_order': False, 'shape': (99999999999999999999,), }", 8))).toThrow(/shape has a number too large/);
  });
});
