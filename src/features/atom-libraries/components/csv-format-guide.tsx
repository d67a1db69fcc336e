import { ATOM_CSV_COLUMN_DOCS, ATOM_CSV_EXAMPLE, ATOM_CSV_METADATA_DOCS, ATOM_LIBRARY_LIMITS } from '@shared/schemas/atom-libraries';
import { Card } from '@/components/ui/card';

/** The library CSV explained: columns with units, the `# key: value` lines, an example. */
export function CsvFormatGuide() {
  return (
    <Card
      title="The library CSV"
      description={`One header row, then one row per atom; lines starting with # carry the library's facts. At most ${ATOM_LIBRARY_LIMITS.maxAtoms} atoms and ${ATOM_LIBRARY_LIMITS.maxBytes / 1024 / 1024} MiB. Problems are reported by row (the line of the file, header and # lines included) and column.`}
    >
      <div className="overflow-x-auto">
        <table className="w-full text-sm">
          <caption className="sr-only">Columns of the library CSV</caption>
          <thead className="text-left text-ink-soft">
            <tr>
              <th scope="col" className="py-2 pr-4 font-bold">Column</th>
              <th scope="col" className="py-2 pr-4 font-bold">Unit</th>
              <th scope="col" className="py-2 pr-4 font-bold">Meaning</th>
              <th scope="col" className="py-2 font-bold">Example</th>
            </tr>
          </thead>
          <tbody>
            {ATOM_CSV_COLUMN_DOCS.map((c) => (
              <tr key={c.column} className="border-t border-line/70">
                <th scope="row" className="py-1.5 pr-4 text-left font-mono font-semibold">{c.column}</th>
                <td className="py-1.5 pr-4">{c.unit}</td>
                <td className="py-1.5 pr-4">{c.meaning}</td>
                <td className="py-1.5 font-mono">{c.example}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <h3 className="mt-5 mb-2 font-extrabold">Library lines</h3>
      <ul className="flex flex-col gap-1 text-sm">
        {ATOM_CSV_METADATA_DOCS.map((m) => (
          <li key={m.key}>
            <code className="font-mono font-semibold">
              # {m.key}: {m.example}
            </code>{' '}
            — {m.meaning}
          </li>
        ))}
      </ul>
      <p className="mt-3 text-sm text-ink-soft">
        Checked on upload: every cell a number, amplitudes t_x and t_y within 0…1, sizes positive and no larger than the period, unique
        atom ids and geometries, at least 8 atoms, and no phase gap wider than 2π/8 on either axis.
      </p>
      <h3 className="mt-5 mb-2 font-extrabold">Example</h3>
      <pre className="overflow-x-auto rounded-xl bg-paper-deep p-3 font-mono text-xs">{ATOM_CSV_EXAMPLE}</pre>
    </Card>
  );
}
