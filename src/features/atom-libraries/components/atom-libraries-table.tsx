import { Link } from 'react-router-dom';
import type { AtomLibrarySummary } from '@shared/schemas/atom-libraries';
import { AtomLibraryBadges } from '@/features/atom-libraries/components/atom-library-badges';

interface AtomLibrariesTableProps {
  libraries: AtomLibrarySummary[];
  libraryHref: (libraryId: number | 'demo') => string;
}

/** The libraries this project can see: the demo library first, then uploads, newest first. */
export function AtomLibrariesTable({ libraries, libraryHref }: AtomLibrariesTableProps) {
  return (
    <div className="overflow-x-auto rounded-card bg-card shadow-card ring-1 ring-line/70">
      <table className="w-full text-sm">
        <caption className="sr-only">Atom libraries</caption>
        <thead className="text-left text-ink-soft">
          <tr>
            <th scope="col" className="px-4 py-3 font-bold">Library</th>
            <th scope="col" className="px-4 py-3 text-right font-bold">Atoms</th>
            <th scope="col" className="px-4 py-3 text-right font-bold">λ (nm)</th>
            <th scope="col" className="px-4 py-3 text-right font-bold">P (nm)</th>
            <th scope="col" className="px-4 py-3 text-right font-bold">Height (nm)</th>
            <th scope="col" className="px-4 py-3 font-bold">Scope</th>
            <th scope="col" className="px-4 py-3 font-bold">Uploaded by</th>
          </tr>
        </thead>
        <tbody>
          {libraries.map((library) => (
            <tr key={library.id} className="border-t border-line/70">
              <th scope="row" className="px-4 py-3 text-left">
                <Link to={libraryHref(library.id)} className="font-bold text-ink underline decoration-line-strong underline-offset-4 hover:decoration-ember">
                  {library.name}
                </Link>
                {library.material ? <p className="mt-0.5 font-normal text-ink-soft">{library.material}</p> : null}
              </th>
              <td className="px-4 py-3 text-right tabular-nums">{library.atomCount}</td>
              <td className="px-4 py-3 text-right tabular-nums">{library.scope === 'demo' ? 'any' : library.wavelengthNm}</td>
              <td className="px-4 py-3 text-right tabular-nums">{library.scope === 'demo' ? 'any' : library.periodNm}</td>
              <td className="px-4 py-3 text-right tabular-nums">{library.heightNm}</td>
              <td className="px-4 py-3">
                <AtomLibraryBadges library={library} />
              </td>
              <td className="px-4 py-3 text-ink-soft">{library.owner?.name ?? '—'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
