import type { DesignRuleViolationView } from '@shared/schemas/fab';

const KIND = { gap: 'Gap', feature: 'Feature', 'aspect-ratio': 'Aspect ratio' } as const;

const amount = (value: number, unit: string) => `${Number(value.toPrecision(4))}${unit ? ` ${unit}` : ''}`;

/** The stored violations with their cells; choosing one moves the layout view there. */
export function ViolationsList({ violations, total, onShow }: { violations: DesignRuleViolationView[]; total: number; onShow: (v: DesignRuleViolationView) => void }) {
  if (total === 0) return <p className="text-sm">No design-rule violations.</p>;
  return (
    <div className="flex flex-col gap-2">
      <p className="text-sm text-ink-soft">
        {total} violation{total === 1 ? '' : 's'}
        {violations.length < total ? `; the first ${violations.length} are listed` : ''}. Choose one to show it. Cells
        (ix, iy) count to the right and upwards from the bottom-left corner.
      </p>
      <ul className="max-h-96 overflow-y-auto rounded-xl ring-1 ring-line" aria-label="Design-rule violations">
        {violations.map((v, k) => (
          <li key={k} className="border-b border-line/70 last:border-b-0">
            <button type="button" className="flex w-full flex-col items-start px-3 py-2 text-left text-sm hover:bg-paper-deep focus-visible:bg-paper-deep" onClick={() => onShow(v)}>
              <span className="font-bold">
                {KIND[v.kind]} at cell ({v.ix}, {v.iy}){v.neighbour ? ` – (${v.neighbour.ix}, ${v.neighbour.iy})` : ''}
              </span>
              <span className="tabular-nums text-ink-soft">
                {amount(v.value, v.unit)} (limit {amount(v.limit, v.unit)}) · atom {v.atomId}
              </span>
            </button>
          </li>
        ))}
      </ul>
    </div>
  );
}
