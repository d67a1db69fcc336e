import type { RunMetric } from '@shared/schemas/runs';
import { Card } from '@/components/ui/card';
import { formatLength } from '@/features/runs/components/format-run';
import type { DesignRuleFinding } from '@/features/runs/components/run-plots';

interface DesignRulesCardProps {
  findings: DesignRuleFinding[];
  truncated: boolean;
  counts: Record<string, RunMetric> | null;
}

const KIND_NAMES: Record<string, string> = {
  gap: 'Gap too narrow',
  feature: 'Feature too small',
  'aspect-ratio': 'Aspect ratio too high',
};

const measure = (finding: DesignRuleFinding, v: number) => (finding.kind === 'aspect-ratio' ? `${v.toFixed(2)} : 1` : formatLength(v));

/** The design-rule report: how many findings of each kind, and where the first ones are. */
export function DesignRulesCard({ findings, truncated, counts }: DesignRulesCardProps) {
  const total = Object.entries(counts ?? {})
    .filter(([key]) => /violations$/i.test(key))
    .reduce((sum, [, m]) => sum + (m.value ?? 0), 0);
  return (
    <Card
      title="Design-rule report"
      description="Checked on the mapped layout before export: minimum gap between neighbouring rotated pillars, minimum feature and maximum aspect ratio."
    >
      {findings.length === 0 ? (
        <p className="flex items-center gap-2 font-bold text-success">
          <span aria-hidden="true">✓</span>
          {total > 0 ? `${total} findings; see the metrics below.` : 'No rule is broken: the layout passes every check.'}
        </p>
      ) : (
        <>
          <p className="mb-3 text-sm">
            <span className="font-bold text-danger">{total || findings.length} findings.</span>{' '}
            <span className="text-ink-soft">
              {truncated ? `The first ${findings.length}, row by row:` : 'All of them, row by row:'} cell column ix counts
              to the right and row iy upwards from the bottom-left corner of the layout (x right, y up, as in the GDSII and
              the previews).
            </span>
          </p>
          <div role="region" aria-label="Design-rule findings, scrollable" tabIndex={0} className="max-h-96 overflow-auto rounded-2xl ring-1 ring-line/70 ring-inset">
            <table className="w-full min-w-[36rem] text-sm">
              <caption className="sr-only">Design-rule findings</caption>
              <thead className="sticky top-0 border-b border-line bg-card text-ink-soft">
                <tr>
                  <th scope="col" className="px-3 py-2 text-left font-bold">Finding</th>
                  <th scope="col" className="px-3 py-2 text-left font-bold">Cell (ix, iy)</th>
                  <th scope="col" className="px-3 py-2 text-right font-bold">Found</th>
                  <th scope="col" className="px-3 py-2 text-right font-bold">Limit</th>
                  <th scope="col" className="px-3 py-2 text-left font-bold">Atom</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-line/70">
                {findings.map((finding, i) => (
                  <tr key={i}>
                    <td className="px-3 py-1.5">{KIND_NAMES[finding.kind] ?? finding.kind}</td>
                    <td className="px-3 py-1.5 tabular-nums">
                      ({finding.ix}, {finding.iy})
                      {finding.neighbour ? ` ↔ (${finding.neighbour.ix}, ${finding.neighbour.iy})` : ''}
                    </td>
                    <td className="px-3 py-1.5 text-right tabular-nums">{measure(finding, finding.value)}</td>
                    <td className="px-3 py-1.5 text-right tabular-nums">{measure(finding, finding.limit)}</td>
                    <td className="px-3 py-1.5">{finding.atomId}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </>
      )}
    </Card>
  );
}
