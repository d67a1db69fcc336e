import { useId } from 'react';
import type { MetricChange } from '@shared/schemas/run-comparison';
import { Card } from '@/components/ui/card';
import { formatLength, formatMetricValue, metricName, sectionName } from '@/features/runs/components/format-run';

/** b − a in the metric's own unit, signed: fractions in percentage points, lengths in nm/µm/mm. */
export function formatMetricDelta(unit: string, delta: number | null): string {
  if (delta === null || !Number.isFinite(delta)) return '—';
  if (delta === 0) return '0';
  const sign = delta > 0 ? '+' : '−';
  const size = Math.abs(delta);
  const points = 100 * size >= 0.01 ? (100 * size).toFixed(2) : (100 * size).toPrecision(2);
  if (unit === 'fraction') return `${sign}${points} pp`;
  if (unit === 'fraction of target peak') return `${sign}${points} pp of target peak`;
  if (unit === 'm') return `${sign}${formatLength(size)}`;
  return `${sign}${formatMetricValue({ value: size, unit, meaning: '' })}`;
}

/** (b − a)/|a| in %, signed. */
export function formatPercentChange(percent: number | null): string {
  if (percent === null || !Number.isFinite(percent)) return '—';
  if (percent === 0) return '0 %';
  const size = Math.abs(percent);
  const text = size >= 100 ? size.toFixed(0) : size >= 0.1 ? size.toFixed(1) : size.toPrecision(2);
  return `${percent > 0 ? '+' : '−'}${text} %`;
}

const valueOf = (row: MetricChange, side: 'a' | 'b') => formatMetricValue({ value: row[side], unit: row.unit, meaning: row.meaning });

/** Every metric of two runs, by section: both values, the change b − a and the change in % of a. */
export function MetricChangesTable({ rows, runA, runB }: { rows: MetricChange[]; runA: number; runB: number }) {
  const headingId = useId();
  const sections = [...new Set(rows.map((row) => sectionName(row.section)))];
  return (
    <Card
      title={<span id={headingId}>Metrics</span>}
      description={`Every metric of both runs with its change from run ${runA} to run ${runB}: Δ in the metric’s own unit (fractions in percentage points, pp), % relative to run ${runA}. Whether a rise is good depends on the metric — read its meaning.`}
    >
      <div role="region" aria-labelledby={headingId} className="flex flex-col gap-6">
        {sections.map((section) => (
          <div key={section} className="overflow-x-auto">
            <table className="w-full min-w-[44rem] table-fixed text-sm">
              <caption className="mb-2 text-left font-extrabold text-ink">{section}</caption>
              <thead className="border-b border-line text-ink-soft">
                <tr>
                  <th scope="col" className="w-[28%] px-3 py-2 text-left font-bold">
                    Metric
                  </th>
                  <th scope="col" className="px-3 py-2 text-right font-bold">
                    Run {runA}
                  </th>
                  <th scope="col" className="px-3 py-2 text-right font-bold">
                    Run {runB}
                  </th>
                  <th scope="col" className="px-3 py-2 text-right font-bold">
                    Δ
                  </th>
                  <th scope="col" className="w-[12%] px-3 py-2 text-right font-bold">
                    %
                  </th>
                </tr>
              </thead>
              <tbody className="divide-y divide-line/70">
                {rows
                  .filter((row) => sectionName(row.section) === section)
                  .map((row) => (
                    <tr key={`${row.section}.${row.key}`} className="align-top">
                      <th scope="row" className="px-3 py-2 text-left font-bold" title={row.meaning}>
                        {metricName(row.key)}
                      </th>
                      <td className="px-3 py-2 text-right whitespace-nowrap tabular-nums">{valueOf(row, 'a')}</td>
                      <td className="px-3 py-2 text-right whitespace-nowrap tabular-nums">{valueOf(row, 'b')}</td>
                      <td className={`px-3 py-2 text-right font-bold whitespace-nowrap tabular-nums ${row.delta ? 'text-ink' : 'text-ink-soft'}`}>{formatMetricDelta(row.unit, row.delta)}</td>
                      <td className="px-3 py-2 text-right whitespace-nowrap text-ink-soft tabular-nums">{formatPercentChange(row.percent)}</td>
                    </tr>
                  ))}
              </tbody>
            </table>
          </div>
        ))}
      </div>
    </Card>
  );
}
