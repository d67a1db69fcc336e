/**
 * The revision comparison names every field of a design in words: no dotted path of the design format
 * (e.g. "atomLibrary.id") reaches the screen as its label.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { designSchema } from '../../shared/schemas/design';
import { describeField } from '../../src/features/designs/utils/design-fields';
import { flattenDesign } from '../../src/features/designs/utils/flatten-design';

const demo = (file: string) => designSchema.parse(JSON.parse(readFileSync(new URL(`../../demo-assets/designs/${file}`, import.meta.url), 'utf8')));

describe('field labels of the revision comparison', () => {
  const twin = demo('twin-image.json');
  const designs = {
    'twin image': twin,
    'Bessel and vortex pair': demo('bessel-vortex.json'),
    'a stored atom library': { ...twin, atomLibrary: { source: 'library' as const, id: 2 } },
    'an atom library file': { ...twin, atomLibrary: { source: 'file' as const, path: 'atoms.csv' } },
  };
  it.each(Object.entries(designs))('%s: every path has words of its own', (_name, design) => {
    for (const path of flattenDesign(design).keys()) {
      const { label } = describeField(path, design);
      expect(label, path).not.toBe(path);
      expect(label, path).not.toMatch(/[a-z][A-Z]|\.[a-z]/);
    }
  });
});
