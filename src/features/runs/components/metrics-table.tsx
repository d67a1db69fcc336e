import { useId } from 'react';
import type { RunDetail } from '@shared/schemas/runs';
import { Card } from '@/components/ui/card';
import { MathText } from '@/components/ui/math-text';
import { formatMetricValue, metricName, sectionName } from '@/features/runs/components/format-run';
import { CIRCULAR_ONLY } from '@/features/runs/components/mapping-report-card';

/** Every metric of the run, by section, with its value and unit and the one line that says what it measures. */
export function MetricsTable({ metrics, circularPair = true }: { metrics: NonNullable<RunDetail['metrics']>; circularPair?: boolean }) {
  const headingId = useId();
  const sections = Object.entries(metrics).filter(([, group]) => group && Object.keys(group).length > 0);
  return (
    <Card
      title={<span id={headingId}>Metrics</span>}
      description="Computed on the realized device. Fractions are shown in %, lengths in nm, µm or mm, ratios of powers in dB; pure numbers (correlations, sin β, Strehl ratio) have no unit."
    >
      <div role="region" aria-labelledby={headingId} className="flex flex-col gap-6">
        {sections.map(([section, group]) => (
          // Focusable, so a narrow screen's sideways scrolling of the table works from the keyboard too.
          <div key={section} className="overflow-x-auto" tabIndex={0} role="group" aria-label={sectionName(section)}>
            <table className="w-full min-w-[40rem] table-fixed text-sm">
              <caption className="mb-2 text-left font-extrabold text-ink">{sectionName(section)}</caption>
              <thead className="border-b border-line text-ink-soft">
                <tr>
                  <th scope="col" className="w-[30%] px-3 py-2 text-left font-bold">
                    Metric
                  </th>
                  <th scope="col" className="w-[18%] px-3 py-2 text-right font-bold">
                    Value
                  </th>
                  <th scope="col" className="px-3 py-2 text-left font-bold">
                    What it means
                  </th>
                </tr>
              </thead>
              <tbody className="divide-y divide-line/70">
                {Object.entries(group)
                  .filter(([key]) => circularPair || !CIRCULAR_ONLY.has(key))
                  .map(([key, metric]) => (
                  <tr key={key} className="align-top">
                    <th scope="row" className="px-3 py-2 text-left font-bold">
                      {metricName(key)}
                    </th>
                    <td className="px-3 py-2 text-right font-bold whitespace-nowrap tabular-nums">{formatMetricValue(metric)}</td>
                    <td className="px-3 py-2 text-ink-soft">
                      <MathText text={metric.meaning} />
                    </td>
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
