import { useMemo, useState } from 'react';
import type { AtomRow } from '@shared/schemas/atom-libraries';
import { SortHeader } from '@/components/ui/sort-header';
import { retardance } from '@/features/atom-libraries/components/atom-library-charts';

type SortKey = 'id' | 'widthNm' | 'lengthNm' | 'tx' | 'alphaX' | 'ty' | 'alphaY' | 'retardance';
const SHOWN = 1000;

const columns: { key: SortKey; label: string }[] = [
  { key: 'id', label: 'Atom' },
  { key: 'widthNm', label: 'Width (nm)' },
  { key: 'lengthNm', label: 'Length (nm)' },
  { key: 'tx', label: 't_x' },
  { key: 'alphaX', label: 'α_x (rad)' },
  { key: 'ty', label: 't_y' },
  { key: 'alphaY', label: 'α_y (rad)' },
  { key: 'retardance', label: 'Retardance (rad)' },
];

const value = (atom: AtomRow, key: SortKey): number | string => (key === 'retardance' ? retardance(atom) : atom[key]);

/** Every atom of a library, sortable by any column. */
export function AtomTable({ atoms }: { atoms: AtomRow[] }) {
  const [sort, setSort] = useState<{ sort: SortKey; dir: 'asc' | 'desc' }>({ sort: 'id', dir: 'asc' });
  const sorted = useMemo(() => {
    const sign = sort.dir === 'asc' ? 1 : -1;
    return [...atoms].sort((a, b) => {
      const va = value(a, sort.sort);
      const vb = value(b, sort.sort);
      if (typeof va === 'string' && typeof vb === 'string') return sign * va.localeCompare(vb, undefined, { numeric: true });
      return sign * ((va as number) - (vb as number));
    });
  }, [atoms, sort]);
  const onSort = (key: SortKey) => setSort((s) => ({ sort: key, dir: s.sort === key && s.dir === 'asc' ? 'desc' : 'asc' }));

  return (
    <div>
      <div className="max-h-[32rem] overflow-auto rounded-xl ring-1 ring-line">
        <table className="w-full text-sm tabular-nums">
          <caption className="sr-only">Atoms of the library</caption>
          <thead className="sticky top-0 bg-paper-deep text-ink-soft">
            <tr>
              {columns.map((c) => (
                <SortHeader key={c.key} label={c.label} sortKey={c.key} sort={sort} onSort={onSort} align={c.key === 'id' ? 'left' : 'right'} className="px-3" />
              ))}
            </tr>
          </thead>
          <tbody>
            {sorted.slice(0, SHOWN).map((a) => (
              <tr key={a.id} className="border-t border-line/70">
                <th scope="row" className="px-3 py-1.5 text-left font-semibold">
                  {a.id}
                  {a.shape === 'empty' ? <span className="ml-1 font-normal text-ink-soft">(empty cell)</span> : null}
                </th>
                <td className="px-3 py-1.5 text-right">{a.widthNm}</td>
                <td className="px-3 py-1.5 text-right">{a.lengthNm}</td>
                <td className="px-3 py-1.5 text-right">{a.tx.toFixed(3)}</td>
                <td className="px-3 py-1.5 text-right">{a.alphaX.toFixed(3)}</td>
                <td className="px-3 py-1.5 text-right">{a.ty.toFixed(3)}</td>
                <td className="px-3 py-1.5 text-right">{a.alphaY.toFixed(3)}</td>
                <td className="px-3 py-1.5 text-right">{retardance(a).toFixed(3)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {atoms.length > SHOWN ? (
        <p className="mt-2 text-xs text-ink-soft">
          The first {SHOWN} of {atoms.length} atoms in this order are shown; sort by another column or download the CSV for all.
        </p>
      ) : null}
    </div>
  );
}
