/**
 * The atom-library CSV as a hostile reader meets it: every library round-trips through atomLibraryToCsv exactly
 * (property test over seeded random libraries whose ids hold commas, quotes, line breaks, a leading `#`, white
 * space at either end and non-Latin text), and the reading limits stop at the first excess.
 */
import { describe, expect, it } from 'vitest';
import { ATOM_CSV_COLUMNS, atomLibraryToCsv, checkAtomLibrary, CsvLimitError, parseAtomLibraryCsv, validateAtomLibrary, type AtomLibrary, type MetaAtom } from '../../shared/optics/atoms';
import { demoAtomLibrary } from '../../shared/optics/demo-library';
import { mulberry32 } from '../../shared/optics/random';
import { csvFlood } from '../support/hostile-corpus';

/** Pieces ids are made of: the characters CSV and our comment lines give meaning to, and other scripts. */
const PIECES = ['#', '# approximate: false', ',', '"', '""', ' ', '\t', '\n', '\r\n', 'a', 'Z9', 'é', 'Ω', '偏振', 'مرشح', '🔬', '\\', "'", ';', '=1+1'];

function randomId(random: () => number): string {
  const parts = 1 + Math.floor(random() * 5);
  let id = '';
  for (let i = 0; i < parts; i++) id += PIECES[Math.floor(random() * PIECES.length)];
  return id;
}

/**
 * A random valid library of 8…40 atoms: sizes on the 0.1 nm grid the CSV writes exactly, transmissions and
 * phases any doubles (written in their shortest exact decimal form), unique ids from PIECES (not blank: a blank
 * id is refused by validation).
 */
function randomLibrary(seed: number): AtomLibrary {
  const random = mulberry32(seed);
  // Lengths as the reader makes them from nanometres (n · 1e-9): the CSV holds nm to 1e-4 nm.
  const nm = (n: number) => n * 1e-9;
  const period = nm(450);
  const count = 8 + Math.floor(random() * 33);
  const ids = new Set<string>();
  while (ids.size < count) {
    const id = randomId(random);
    if (id.trim() !== '') ids.add(id);
  }
  const atoms: MetaAtom[] = [...ids].map((id, i) => {
    const width = nm(60 + i * 8 + Math.floor(random() * 80) / 10);
    return {
      id,
      shape: 'rect',
      width,
      length: nm(100 + Math.floor(random() * 3000) / 10),
      height: nm(600),
      period,
      tx: random(),
      alphaX: (2 * Math.PI * i) / count,
      ty: random(),
      alphaY: (2 * Math.PI * (count - 1 - i)) / count,
    };
  });
  return { name: `Library ${seed} — ${randomId(random).replace(/[\r\n]+/g, ' ').trim() || 'x'}`, lambda: nm(633), period, height: nm(600), material: 'TiO₂ on SiO₂', approximate: random() < 0.5, atoms };
}

describe('library CSV round trip (property, seeded)', () => {
  it('every random library reads back exactly, ids and the approximate flag included', () => {
    for (let seed = 1; seed <= 300; seed++) {
      const library = randomLibrary(seed);
      expect(validateAtomLibrary(library).filter((i) => i.severity === 'error'), `seed ${seed}`).toEqual([]);
      const { library: back, issues } = parseAtomLibraryCsv(atomLibraryToCsv(library));
      expect(issues.filter((i) => i.severity === 'error'), `seed ${seed}`).toEqual([]);
      expect(back, `seed ${seed}`).toEqual(library);
    }
  });

  it('an id that reads like a metadata line stays an atom and cannot change the library', () => {
    const library = { ...demoAtomLibrary(), approximate: true };
    library.atoms = library.atoms.map((a, i) => (i === 0 ? { ...a, id: '# approximate: false' } : i === 1 ? { ...a, id: '#name: other' } : a));
    const text = atomLibraryToCsv(library);
    expect(text).toContain('\n"# approximate: false",');
    const { library: back } = parseAtomLibraryCsv(text);
    expect(back.approximate).toBe(true);
    expect(back.name).toBe(library.name);
    expect(back.atoms.map((a) => a.id)).toEqual(library.atoms.map((a) => a.id));
  });
});

describe('library CSV reading limits', () => {
  const limits = { maxRows: 20_000, maxColumns: 64, maxLineChars: 4000, maxIssues: 200 };

  it('stops at the first row past the limit, naming its line', () => {
    const error = (() => {
      try {
        parseAtomLibraryCsv(csvFlood().toString(), {}, { limits });
      } catch (e) {
        return e;
      }
    })();
    expect(error).toBeInstanceOf(CsvLimitError);
    expect(error).toMatchObject({ limit: 'rows', line: 20_003, message: 'the file holds more than 20000 atom rows (line 20003 would be row 20001)' });
  });

  it('stops at an over-long line and at a row with too many columns', () => {
    expect(() => parseAtomLibraryCsv(`atom_id\n${'x'.repeat(5000)}\n`, {}, { limits })).toThrow(/line 2 is longer than 4000 characters/);
    expect(() => parseAtomLibraryCsv(`${ATOM_CSV_COLUMNS.join(',')}\n${','.repeat(64)}\n`, {}, { limits })).toThrow(/line 2 has more than 64 columns/);
    // A quoted cell spanning lines counts whole, so a never-closed quote cannot swallow the file unchecked.
    expect(() => parseAtomLibraryCsv(`atom_id\n"${'x\n'.repeat(3000)}`, {}, { limits })).toThrow(/line 2 is longer than 4000 characters/);
  });

  it('lists the first problems and counts them all, each cell once', () => {
    const { issues, issueCount, errorCount } = parseAtomLibraryCsv(csvFlood(1000).toString(), {}, { limits });
    expect(issues).toHaveLength(200);
    // Per row: 8 cells that are not numbers, a shape that is neither rect nor empty, and (after the first) a repeated
    // id; for the library: no name, no period, no height, no phases on either axis.
    expect(errorCount).toBe(1000 * 8 + 1000 + 999 + 5);
    expect(issueCount).toBe(errorCount);
    const unlimited = parseAtomLibraryCsv(csvFlood(1000).toString());
    expect(unlimited.issues).toHaveLength(errorCount);
    expect(new Set(unlimited.issues.map((i) => `${i.row}:${i.column}:${i.message}`)).size).toBe(errorCount);
  });

  it('checkAtomLibrary counts what it does not list', () => {
    const library = randomLibrary(7);
    library.atoms = library.atoms.map((a) => ({ ...a, tx: 2 }));
    const all = validateAtomLibrary(library);
    const capped = checkAtomLibrary(library, { maxIssues: 3 });
    expect(capped.issues).toEqual(all.slice(0, 3));
    expect(capped.count).toBe(all.length);
  });
});
