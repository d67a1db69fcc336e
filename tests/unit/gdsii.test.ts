import { describe, expect, it } from 'vitest';
import { RecordType } from 'gdsii';
import { readGdsLayout, type GdsPlacement } from '../support/gds-read';
import { atomStructureName, encodeGdsReal8, gdsiiBytes, gdsiiChunks, GDS_VERSION } from '../../shared/optics/gdsii';
import type { AtomLibrary, MetaAtom } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { mulberry32 } from '../../shared/optics/random';

const hex = (bytes: Uint8Array): string => Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');

/**
 * Decoder written from the manual's definition, independent of the writer: value =
 * (−1)^S · M · 16^(E−64), M the 56-bit fraction; evaluated exactly with BigInt and rounded once.
 */
function decodeReal8ByDefinition(b: Uint8Array): number {
  const sign = b[0] & 0x80 ? -1 : 1;
  const exponent = (b[0] & 0x7f) - 64;
  let mantissa = 0n;
  for (let i = 1; i < 8; i++) mantissa = (mantissa << 8n) | BigInt(b[i]);
  // value = mantissa · 2^(4·exponent − 56); mantissa < 2^56 fits a double exactly only if ≤ 53 bits,
  // so scale through a power of two that Number() represents exactly.
  const shift = 4 * exponent - 56;
  return sign * Number(mantissa) * 2 ** shift;
}

describe('8-byte excess-64 reals (GDSII Stream Format Manual 6.0, "Data Types")', () => {
  it('encodes values worked out by hand from the definition', () => {
    // 1 = (1/16)·16^1 → E = 65 = 0x41, M = 0x10…
    expect(hex(encodeGdsReal8(1))).toBe('4110000000000000');
    // 0.5 = 0.5·16^0 → E = 64 = 0x40, M = 0x80…
    expect(hex(encodeGdsReal8(0.5))).toBe('4080000000000000');
    // 90 = (0x5A/256)·16^2 → E = 0x42, M = 0x5A…
    expect(hex(encodeGdsReal8(90))).toBe('425a000000000000');
    expect(hex(encodeGdsReal8(-90))).toBe('c25a000000000000');
    // 100 = (0x64/256)·16^2
    expect(hex(encodeGdsReal8(100))).toBe('4264000000000000');
    expect(hex(encodeGdsReal8(0))).toBe('0000000000000000');
  });

  it('1e-3 and 1e-9 carry the familiar leading bytes 3E4189374BC6A7… and 3944B82FA09B5A… (from memory) and decode exactly', () => {
    const milli = encodeGdsReal8(1e-3);
    const nano = encodeGdsReal8(1e-9);
    expect(hex(milli).slice(0, 14)).toBe('3e4189374bc6a7');
    expect(hex(nano).slice(0, 14)).toBe('3944b82fa09b5a');
    expect(decodeReal8ByDefinition(milli)).toBe(1e-3);
    expect(decodeReal8ByDefinition(nano)).toBe(1e-9);
  });

  it('round-trips every tested double exactly through the definition', () => {
    const rand = mulberry32(64);
    for (let t = 0; t < 2000; t++) {
      const v = (rand() - 0.5) * 10 ** Math.floor(rand() * 40 - 20);
      const bytes = encodeGdsReal8(v);
      expect(decodeReal8ByDefinition(bytes)).toBe(v);
      if (v !== 0) {
        const m1 = bytes[1] >> 4;
        expect(m1).toBeGreaterThan(0); // normalized: first hex digit of M non-zero
      }
    }
    expect(() => encodeGdsReal8(Number.POSITIVE_INFINITY)).toThrow(RangeError);
    expect(() => encodeGdsReal8(1e300)).toThrow(RangeError);
  });
});

/** Read back by the independent parser; no placement may be mirrored (STRANS flags 0 wherever present). */
function readBack(bytes: Uint8Array) {
  const back = readGdsLayout(bytes);
  for (const structure of back.structures.values()) for (const placement of structure.srefs) expect(placement.strans).toBe(0);
  return { ...back, last: back.lastTag };
}

function smallLibrary(): AtomLibrary {
  const mk = (id: string, w: number, l: number): MetaAtom => ({
    id, shape: 'rect', width: w, length: l, height: 600e-9, period: 500e-9, tx: 1, alphaX: 0, ty: 1, alphaY: 1,
  });
  return {
    name: 'gds test', lambda: 900e-9, period: 500e-9, height: 600e-9, material: 'test', approximate: false,
    atoms: [
      { id: 'none', shape: 'empty', width: 0, length: 0, height: 0, period: 500e-9, tx: 1, alphaX: 0, ty: 1, alphaY: 0 },
      mk('a', 120e-9, 300e-9),
      mk('b', 200e-9, 200e-9),
      mk('c', 151e-9, 333e-9),
    ],
  };
}

describe('GDSII layout read back by the independent `gdsii` parser', () => {
  it('has identical placements, angles, layer, units and structure count', () => {
    const library = smallLibrary();
    const n = 7;
    const rand = mulberry32(3);
    const atomIndex = Int32Array.from({ length: n * n }, () => Math.floor(rand() * 4));
    const theta = Float64Array.from({ length: n * n }, () => (rand() - 0.5) * 2 * Math.PI);
    const bytes = gdsiiBytes({ n, period: library.period, atomIndex, theta, library, layer: 7, datatype: 3, topName: 'TOP' });
    const back = readBack(bytes);
    expect(back.header).toBe(GDS_VERSION);
    expect(back.last).toBe(RecordType.ENDLIB);
    // The parser adds up the 56 fraction bits in floating point: relative error ~1e-14, so compare to 1e-12.
    expect(Math.abs(back.units!.userUnit / 1e-3 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(back.units!.metersPerUnit / 1e-9 - 1)).toBeLessThan(1e-12);
    // one structure per non-empty atom + top
    expect(back.structures.size).toBe(3 + 1);
    for (const k of [1, 2, 3]) {
      const s = back.structures.get(atomStructureName(k))!;
      expect(s.boundaries.length).toBe(1);
      const b = s.boundaries[0];
      expect(b.layer).toBe(7);
      expect(b.datatype).toBe(3);
      const xs = b.xy.map((p) => p[0]);
      const ys = b.xy.map((p) => p[1]);
      expect(b.xy.length).toBe(5);
      expect(b.xy[0]).toEqual(b.xy[4]);
      expect(Math.max(...xs) - Math.min(...xs)).toBe(Math.round(library.atoms[k].width * 1e9));
      expect(Math.max(...ys) - Math.min(...ys)).toBe(Math.round(library.atoms[k].length * 1e9));
      expect(Math.abs(Math.max(...xs) + Math.min(...xs))).toBeLessThanOrEqual(1);
      expect(Math.abs(Math.max(...ys) + Math.min(...ys))).toBeLessThanOrEqual(1);
    }
    const placements = back.structures.get('TOP')!.srefs;
    const expected: Omit<GdsPlacement, 'strans'>[] = [];
    for (let iy = 0; iy < n; iy++) {
      for (let ix = 0; ix < n; ix++) {
        const i = iy * n + ix;
        const k = atomIndex[i];
        if (k === 0) continue;
        const a = library.atoms[k];
        // rectangle: rotation is defined mod 180°, written in [0, 180); square: unrotated
        let deg = 0;
        if (a.width !== a.length) deg = ((((theta[i] * 180) / Math.PI) % 180) + 180) % 180;
        expected.push({ name: `ATOM_${k}`, x: Math.round((ix - (n - 1) / 2) * 500), y: Math.round((iy - (n - 1) / 2) * 500), angle: deg });
      }
    }
    expect(placements.length).toBe(expected.length);
    placements.forEach((p, i) => {
      expect(p.name).toBe(expected[i].name);
      expect(p.x).toBe(expected[i].x);
      expect(p.y).toBe(expected[i].y);
      expect(p.angle).toBeCloseTo(expected[i].angle, 9);
    });
  });

  it('rotating the written rectangle by ANGLE (counter-clockwise) reproduces R(θ) applied to the pillar', () => {
    const library = smallLibrary();
    const theta = 0.4;
    const bytes = gdsiiBytes({ n: 1, period: library.period, atomIndex: Int32Array.of(1), theta: Float64Array.of(theta), library });
    const back = readBack(bytes);
    const sref = back.structures.get('METASURFACE')!.srefs[0];
    const corner = back.structures.get('ATOM_1')!.boundaries[0].xy[2]; // (+w/2, +l/2)
    const a = (sref.angle * Math.PI) / 180;
    const placed = [corner[0] * Math.cos(a) - corner[1] * Math.sin(a), corner[0] * Math.sin(a) + corner[1] * Math.cos(a)];
    const expected = [60 * Math.cos(theta) - 150 * Math.sin(theta), 60 * Math.sin(theta) + 150 * Math.cos(theta)];
    expect(placed[0]).toBeCloseTo(expected[0], 9);
    expect(placed[1]).toBeCloseTo(expected[1], 9);
  });

  it('streams bounded chunks whose concatenation is the whole file', () => {
    const library = demoAtomLibrary();
    const n = 40;
    const rand = mulberry32(8);
    const atomIndex = Int32Array.from({ length: n * n }, () => Math.floor(rand() * library.atoms.length));
    const theta = Float64Array.from({ length: n * n }, () => rand() * Math.PI);
    const layout = { n, period: library.period, atomIndex, theta, library, chunkSize: 4096 };
    const chunks = [...gdsiiChunks(layout)];
    expect(chunks.length).toBeGreaterThan(10);
    for (const c of chunks) expect(c.length).toBeLessThanOrEqual(4096 + 256);
    const whole = gdsiiBytes(layout);
    const joined = new Uint8Array(whole.length);
    let at = 0;
    for (const c of chunks) {
      joined.set(c, at);
      at += c.length;
    }
    expect(at).toBe(whole.length);
    expect(hex(joined.subarray(0, 64))).toBe(hex(whole.subarray(0, 64)));
    expect(Buffer.from(joined).equals(Buffer.from(whole))).toBe(true);
    const back = readBack(whole);
    const nonEmptyCells = Array.from(atomIndex).filter((k) => library.atoms[k].shape !== 'empty').length;
    expect(back.structures.get('METASURFACE')!.srefs.length).toBe(nonEmptyCells);
    expect(back.structures.size).toBe(library.atoms.filter((a) => a.shape !== 'empty').length + 1);
  });

  it('rejects names the format does not allow and bad atom indices', () => {
    const library = smallLibrary();
    const base = { n: 1, period: library.period, atomIndex: Int32Array.of(1), theta: Float64Array.of(0), library };
    expect(() => gdsiiBytes({ ...base, topName: 'has space' })).toThrow(RangeError);
    expect(() => gdsiiBytes({ ...base, layer: 40000 })).toThrow(RangeError);
    expect(() => gdsiiBytes({ ...base, atomIndex: Int32Array.of(9) })).toThrow(RangeError);
  });
});
