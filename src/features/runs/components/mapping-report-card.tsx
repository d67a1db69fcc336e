import { Bar, BarChart, CartesianGrid, Tooltip, XAxis, YAxis } from 'recharts';
import type { RunMetric } from '@shared/schemas/runs';
import { Card } from '@/components/ui/card';
import { MathText } from '@/components/ui/math-text';
import { roundTick } from '@/lib/format';

const GRID = '#ddd3c1';
const TICK = { fill: '#5e4d6e', fontSize: 12 };
const LABEL = { fill: '#5e4d6e', fontSize: 12 };
const chartStyle = { width: '100%', height: 260 };

/** The run's `plots.mappingReport` (shared/optics/mapping-report.ts), as far as this card needs it. */
interface MappingReportData {
  cells: number;
  errorHistogram: { edges: number[]; counts: number[] };
  topAtoms: { index: number; id: string; widthNm: number; lengthNm: number; cells: number }[];
  otherCells: number;
  distinctAtoms: number;
  retardanceThreshold: number;
}

/** The mapping report of a run's plots, or null when the run has none (runs made before it existed). */
export function readMappingReport(plots: Record<string, unknown> | null): MappingReportData | null {
  const report = plots?.mappingReport as MappingReportData | undefined;
  if (!report || !Array.isArray(report.errorHistogram?.counts) || !Array.isArray(report.topAtoms)) return null;
  return report;
}

const FIGURES: { key: string; label: string; format: (v: number) => string }[] = [
  { key: 'meanError', label: 'Mean mapping error', format: (v) => v.toPrecision(3) },
  { key: 'meanTransmission', label: 'Mean transmission', format: (v) => `${(100 * v).toFixed(1)} %` },
  { key: 'retardanceFarFromPi', label: 'Retardance far from π', format: (v) => `${(100 * v).toFixed(1)} % of cells` },
  { key: 'unconvertedCircular', label: 'Unconverted circular light', format: (v) => `${(100 * v).toFixed(2)} %` },
  { key: 'distinctAtoms', label: 'Atoms used', format: (v) => String(v) },
  { key: 'axisSwapped', label: 'Placed turned by 90°', format: (v) => `${(100 * v).toFixed(1)} % of cells` },
];

interface MappingReportCardProps {
  report: MappingReportData;
  /** The run's "atom mapping" metrics section. */
  figures: Record<string, RunMetric> | null;
  /** False for a linear or elliptical pair: the circular-light figures (kept by runs made before they were left out) mean nothing there. */
  circularPair?: boolean;
}

/** Figures about circular light: they mean nothing for a linear or elliptical pair (older runs kept them). */
export const CIRCULAR_ONLY = new Set(['retardanceFarFromPi', 'unconvertedCircular']);

/** How well the library realized the ideal cells: the numbers, the error histogram and the most used atoms. */
export function MappingReportCard({ report, figures, circularPair = true }: MappingReportCardProps) {
  const { edges, counts } = report.errorHistogram;
  const histogram = counts.map((count, b) => ({ bin: `${edges[b].toPrecision(2)}–${edges[b + 1].toPrecision(2)}`, centre: (edges[b] + edges[b + 1]) / 2, share: (100 * count) / report.cells, count }));
  const usage = report.topAtoms.slice(0, 12).map((a) => ({ atom: a.id, share: (100 * a.cells) / report.cells, cells: a.cells, size: a.widthNm > 0 ? `${a.widthNm.toFixed(0)} × ${a.lengthNm.toFixed(0)} nm` : 'no pillar' }));
  const shown = usage.reduce((s, a) => s + a.cells, 0);
  const thresholdDeg = (report.retardanceThreshold * 180) / Math.PI;
  return (
    <Card title="Atom mapping report" description="How closely the chosen atoms reproduce the ideal cell of every position, and which atoms the layout uses.">
      {figures ? (
        <dl className="mb-5 grid gap-x-6 gap-y-3 sm:grid-cols-2 xl:grid-cols-3" aria-label="Mapping figures">
          {FIGURES.filter((f) => figures[f.key] && (circularPair || !CIRCULAR_ONLY.has(f.key))).map((f) => {
            const m = figures[f.key];
            const meaning = f.key === 'retardanceFarFromPi' ? `${m.meaning} (threshold ${thresholdDeg.toFixed(0)}° = π/4)` : m.meaning;
            return (
              <div key={f.key}>
                <dt className="text-sm font-bold text-ink">{f.label}</dt>
                <dd className="text-lg font-extrabold text-ink" data-testid={`mapping-${f.key}`}>
                  {m.value === null ? '—' : f.format(m.value)}
                </dd>
                <dd className="text-xs text-ink-soft">
                  <MathText text={meaning} />
                </dd>
              </div>
            );
          })}
        </dl>
      ) : null}
      <div className="grid gap-6 lg:grid-cols-2">
        <figure className="min-w-0" aria-label="Mapping error histogram">
          <figcaption className="mb-1 text-sm font-bold text-ink">Complex mapping error per cell</figcaption>
          <p className="mb-2 text-xs text-ink-soft">
            <MathText text="$|t_x e^{iα_x} − e^{iδ_x}|² + |t_y e^{iα_y} − e^{iδ_y}|²$" /> of the chosen atom (dimensionless; 0 = exact), share of the{' '}
            {report.cells.toLocaleString('en')} cells per bin.
          </p>
          <BarChart data={histogram} style={chartStyle} responsive margin={{ top: 8, right: 16, bottom: 22, left: 8 }}>
            <CartesianGrid stroke={GRID} strokeDasharray="3 3" vertical={false} />
            <XAxis dataKey="centre" type="category" tick={TICK} tickFormatter={(v) => roundTick(v, 2)} label={{ value: 'mapping error', position: 'insideBottom', offset: -14, ...LABEL }} />
            <YAxis tick={TICK} width={52} tickFormatter={(v) => roundTick(v)} label={{ value: 'cells (%)', angle: -90, position: 'insideLeft', ...LABEL }} />
            <Tooltip formatter={(value, _name, item) => [`${Number(value).toFixed(2)} % (${(item.payload as { count: number }).count} cells)`, 'cells']} labelFormatter={(_label, payload) => `error ${(payload?.[0]?.payload as { bin?: string } | undefined)?.bin ?? ''}`} />
            <Bar dataKey="share" fill="#27686a" isAnimationActive={false} />
          </BarChart>
        </figure>
        <figure className="min-w-0" aria-label="Atom usage">
          <figcaption className="mb-1 text-sm font-bold text-ink">Most used atoms</figcaption>
          <p className="mb-2 text-xs text-ink-soft">
            Share of cells per atom, the {usage.length} most used of {report.distinctAtoms} ({((100 * shown) / report.cells).toFixed(1)} % of the cells).
          </p>
          <BarChart data={usage} style={chartStyle} responsive layout="vertical" margin={{ top: 8, right: 16, bottom: 22, left: 8 }}>
            <CartesianGrid stroke={GRID} strokeDasharray="3 3" horizontal={false} />
            <XAxis type="number" tick={TICK} tickFormatter={(v) => roundTick(v)} label={{ value: 'cells (%)', position: 'insideBottom', offset: -14, ...LABEL }} />
            <YAxis type="category" dataKey="atom" tick={TICK} width={96} />
            <Tooltip formatter={(value, _name, item) => [`${Number(value).toFixed(2)} % (${(item.payload as { cells: number }).cells} cells, ${(item.payload as { size: string }).size})`, 'share']} />
            <Bar dataKey="share" fill="#b94721" isAnimationActive={false} />
          </BarChart>
        </figure>
      </div>
    </Card>
  );
}
