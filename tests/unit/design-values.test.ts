/** Design values in words (shared/design-values.ts): what revision compare and the report print. */
import { describe, expect, it } from 'vitest';
import { diffDesigns } from '../../shared/design-diff';
import { assetName, DESIGN_VALUE_WORDS, signedChange, valueWords } from '../../shared/design-values';
import { designSchema } from '../../shared/schemas/design';

describe('changes of a number', () => {
  it('an angle or a length changes by a signed difference in its unit, never by a percentage', () => {
    expect(signedChange(10, 15, '°')).toBe('+5°');
    expect(signedChange(16, -16, '°')).toBe('−32°');
    expect(signedChange(450, 400, 'nm')).toBe('−50 nm');
    expect(signedChange(0.1, 0.3, 'sin θ')).toBe('+0.2 sin θ');
    expect(signedChange(300, 500, 'µm')).toBe('+200 µm');
  });

  it('a number without a unit of angle or length gets no difference', () => {
    expect(signedChange(3, 17, '')).toBeNull();
    expect(signedChange(3, 17, undefined)).toBeNull();
  });
});

describe('enumerated values', () => {
  it('every enumerated value the design schema accepts for algorithm, seenOn and window units has words', () => {
    const hologram = designSchema.shape.channels.shape.a.shape.terms.element.options.find((o) => 'shape' in o && o.shape.kind.value === 'hologram');
    expect(hologram).toBeDefined();
    const shape = (hologram as unknown as { shape: Record<string, { unwrap?: () => { options: string[] }; def?: unknown }> }).shape;
    for (const key of ['algorithm', 'seenOn'] as const) {
      const options = (shape[key] as unknown as { unwrap: () => { options: string[] } }).unwrap().options;
      for (const value of options) expect(valueWords(key, value), `${key} ${value}`).not.toBeNull();
    }
    expect(valueWords('algorithm', 'weighted-gs')).toBe('weighted Gerchberg–Saxton');
    expect(valueWords('seenOn', 'flat-screen')).toBe('flat screen facing the device');
    expect(Object.values(DESIGN_VALUE_WORDS).flatMap((w) => Object.values(w))).not.toContain('weighted-gs');
    expect(valueWords('algorithm', 'something-else')).toBeNull();
    expect(valueWords('kind', 'hologram')).toBe('image hologram');
    expect(valueWords('kind', 'custom')).toBe('custom phase map');
  });
});

describe('pictures', () => {
  it('an uploaded picture is named by its file name', () => {
    const names = new Map([[2, 'bold-F.png']]);
    expect(assetName({ source: 'upload', id: 2 }, names)).toBe('“bold-F.png” (upload 2)');
    expect(assetName({ source: 'upload', id: 9 }, names)).toBe('upload 9 (no longer in the project)');
    expect(assetName({ source: 'demo', name: 'lighthouse' })).toBe('demo picture “lighthouse”');
  });

  it('a picture swapped for an upload is a change of its id leaf, which names the file', () => {
    const changes = diffDesigns({ image: { source: 'upload', id: 1 } }, { image: { source: 'upload', id: 2 } });
    expect(changes).toEqual([{ path: 'image.id', a: 1, b: 2 }]);
  });
});
