import { useRef, useState, type PointerEvent } from 'react';
import type { DesignRuleViolationView, LayoutRegion } from '@shared/schemas/fab';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { FULL_VIEW, PictureAxes } from '@/components/ui/picture-axes';
import { Spinner } from '@/components/ui/spinner';
import { useRunLayout } from '@/features/fab/api/get-run-layout';

const SIZES = [16, 32, 64, 128] as const;

export interface LayoutView {
  x0: number;
  y0: number;
  size: number;
}

const clamp = (v: number, lo: number, hi: number) => Math.max(lo, Math.min(hi, v));

/** The view of `size` cells centred on cell (ix, iy), kept inside the layout. */
export function viewAround(n: number, ix: number, iy: number, size: number): LayoutView {
  const s = Math.min(size, n);
  return { x0: clamp(Math.round(ix - s / 2), 0, n - s), y0: clamp(Math.round(iy - s / 2), 0, n - s), size: s };
}

const sameCell = (a: { ix: number; iy: number }, ix: number, iy: number) => a.ix === ix && a.iy === iy;

function involves(v: DesignRuleViolationView, ix: number, iy: number) {
  return sameCell(v, ix, iy) || (v.neighbour !== null && sameCell(v.neighbour, ix, iy));
}

function RegionSvg({ region, view, showViolations, focus }: { region: LayoutRegion; view: LayoutView; showViolations: boolean; focus: DesignRuleViolationView | null }) {
  const p = region.periodNm;
  const centre = (region.n - 1) / 2;
  const left = (view.x0 - centre - 0.5) * p;
  const bottom = (view.y0 - centre - 0.5) * p;
  const span = view.size * p;
  const bad = new Set<string>();
  if (showViolations) for (const v of region.violations) {
    bad.add(`${v.ix},${v.iy}`);
    if (v.neighbour) bad.add(`${v.neighbour.ix},${v.neighbour.iy}`);
  }
  const cx = (ix: number) => (ix - centre) * p;
  const cy = (iy: number) => (iy - centre) * p;
  // README "Picture convention": x to the right, y up, seen from above the pillars (the side the light goes to).
  const axes = {
    x: { label: 'x', unit: 'µm', from: left / 1000, to: (left + span) / 1000 },
    y: { label: 'y', unit: 'µm', from: bottom / 1000, to: (bottom + span) / 1000 },
  };
  return (
    <PictureAxes spec={axes} mirrored={false} visible={FULL_VIEW}>
      <svg
        viewBox={`${left} ${-(bottom + span)} ${span} ${span}`}
        className="aspect-square w-full rounded-xl bg-paper-deep ring-1 ring-line"
        role="img"
        aria-label={`Pillars of cells ${view.x0}–${view.x0 + view.size - 1} × ${view.y0}–${view.y0 + view.size - 1}, seen from above`}
        data-testid="layout-svg"
      >
        {/* y up: the layout's frame, as in the GDSII */}
        <g transform="scale(1,-1)">
          {view.size <= 64 ? (
            <g stroke="currentColor" className="text-line" strokeWidth={p * 0.01}>
              {Array.from({ length: view.size + 1 }, (_, k) => (
                <line key={`v${k}`} x1={left + k * p} y1={bottom} x2={left + k * p} y2={bottom + span} />
              ))}
              {Array.from({ length: view.size + 1 }, (_, k) => (
                <line key={`h${k}`} x1={left} y1={bottom + k * p} x2={left + span} y2={bottom + k * p} />
              ))}
            </g>
          ) : null}
          {region.pillars.map((pillar) => {
            const offending = bad.has(`${pillar.ix},${pillar.iy}`);
            const focused = focus !== null && involves(focus, pillar.ix, pillar.iy);
            return (
              <rect
                key={`${pillar.ix},${pillar.iy}`}
                x={pillar.xNm - pillar.widthNm / 2}
                y={pillar.yNm - pillar.lengthNm / 2}
                width={pillar.widthNm}
                height={pillar.lengthNm}
                transform={pillar.angleDeg ? `rotate(${pillar.angleDeg} ${pillar.xNm} ${pillar.yNm})` : undefined}
                className={focused ? 'fill-danger' : offending ? 'fill-danger/60' : 'fill-teal'}
                data-cell={`${pillar.ix},${pillar.iy}`}
              >
                <title>{`cell (${pillar.ix}, ${pillar.iy}) · ${pillar.widthNm.toFixed(0)} × ${pillar.lengthNm.toFixed(0)} nm · ${pillar.angleDeg.toFixed(1)}°`}</title>
              </rect>
            );
          })}
          {showViolations
            ? region.violations.map((v, k) =>
                v.neighbour ? (
                  <line
                    key={k}
                    x1={cx(v.ix)}
                    y1={cy(v.iy)}
                    x2={cx(v.neighbour.ix)}
                    y2={cy(v.neighbour.iy)}
                    stroke="currentColor"
                    className="text-danger"
                    strokeWidth={p * (focus && involves(focus, v.ix, v.iy) ? 0.08 : 0.04)}
                    data-violation={v.kind}
                  />
                ) : (
                  <circle key={k} cx={cx(v.ix)} cy={cy(v.iy)} r={p * 0.48} fill="none" stroke="currentColor" className="text-danger" strokeWidth={p * 0.04} data-violation={v.kind} />
                ),
              )
            : null}
        </g>
      </svg>
    </PictureAxes>
  );
}

function Minimap({ n, view, onJump }: { n: number; view: LayoutView; onJump: (ix: number, iy: number) => void }) {
  const box = 160;
  const scale = box / n;
  return (
    <div className="flex flex-col gap-2">
      <svg
        width={box}
        height={box}
        viewBox={`0 0 ${box} ${box}`}
        className="cursor-crosshair rounded-lg bg-paper-deep ring-1 ring-line"
        role="img"
        aria-label={`Whole layout, ${n} × ${n} cells; the outlined square is the view`}
        onClick={(event) => {
          const r = event.currentTarget.getBoundingClientRect();
          onJump(Math.floor(((event.clientX - r.left) / r.width) * n), Math.floor((1 - (event.clientY - r.top) / r.height) * n));
        }}
        data-testid="layout-minimap"
      >
        <rect
          x={view.x0 * scale}
          y={box - (view.y0 + view.size) * scale}
          width={Math.max(2, view.size * scale)}
          height={Math.max(2, view.size * scale)}
          fill="none"
          stroke="currentColor"
          strokeWidth={2}
          className="text-ember-deep"
        />
      </svg>
      <div className="grid grid-cols-3 gap-1 text-xs">
        <Button size="sm" variant="secondary" onClick={() => onJump(0, n - 1)}>Top left</Button>
        <span />
        <Button size="sm" variant="secondary" onClick={() => onJump(n - 1, n - 1)}>Top right</Button>
        <span />
        <Button size="sm" variant="secondary" onClick={() => onJump(n / 2, n / 2)}>Centre</Button>
        <span />
        <Button size="sm" variant="secondary" onClick={() => onJump(0, 0)}>Bottom left</Button>
        <span />
        <Button size="sm" variant="secondary" onClick={() => onJump(n - 1, 0)}>Bottom right</Button>
      </div>
    </div>
  );
}

interface LayoutViewerProps {
  projectId: number;
  runId: number;
  n: number;
  view: LayoutView;
  onViewChange: (view: LayoutView) => void;
  focus: DesignRuleViolationView | null;
}

/** The run's pillars, drawn as the GDSII places them, for any region; zoom, pan, minimap and the DRC overlay. */
export function LayoutViewer({ projectId, runId, n, view, onViewChange, focus }: LayoutViewerProps) {
  const region = useRunLayout(projectId, runId, view.x0, view.y0, view.size);
  const [showViolations, setShowViolations] = useState(true);
  const drag = useRef<{ x: number; y: number; width: number } | null>(null);
  const move = (dx: number, dy: number) => onViewChange({ ...view, x0: clamp(view.x0 + dx, 0, n - view.size), y0: clamp(view.y0 + dy, 0, n - view.size) });
  const zoom = (size: number) => onViewChange(viewAround(n, view.x0 + view.size / 2, view.y0 + view.size / 2, size));
  const step = Math.max(1, Math.floor(view.size / 2));
  const sizeIndex = SIZES.indexOf(view.size as (typeof SIZES)[number]);
  const onPointerDown = (event: PointerEvent<HTMLDivElement>) => {
    drag.current = { x: event.clientX, y: event.clientY, width: event.currentTarget.getBoundingClientRect().width };
  };
  const onPointerUp = (event: PointerEvent<HTMLDivElement>) => {
    const start = drag.current;
    drag.current = null;
    if (!start) return;
    const cells = view.size / start.width;
    const dx = Math.round((start.x - event.clientX) * cells);
    const dy = Math.round((event.clientY - start.y) * cells);
    if (dx !== 0 || dy !== 0) move(dx, dy);
  };

  return (
    <div className="grid gap-6 lg:grid-cols-[minmax(0,1fr)_12rem]">
      <div className="flex min-w-0 flex-col gap-3">
        <div className="flex flex-wrap items-center gap-2">
          <Button size="sm" variant="secondary" onClick={() => move(-step, 0)} aria-label="Pan left">←</Button>
          <Button size="sm" variant="secondary" onClick={() => move(step, 0)} aria-label="Pan right">→</Button>
          <Button size="sm" variant="secondary" onClick={() => move(0, step)} aria-label="Pan up">↑</Button>
          <Button size="sm" variant="secondary" onClick={() => move(0, -step)} aria-label="Pan down">↓</Button>
          <Button size="sm" variant="secondary" disabled={sizeIndex <= 0} onClick={() => zoom(SIZES[Math.max(0, sizeIndex - 1)])}>Zoom in</Button>
          <Button size="sm" variant="secondary" disabled={sizeIndex < 0 || sizeIndex >= SIZES.length - 1 || view.size >= n} onClick={() => zoom(SIZES[sizeIndex + 1])}>Zoom out</Button>
          <label className="ml-auto inline-flex items-center gap-2 text-sm font-bold">
            <input type="checkbox" checked={showViolations} onChange={(event) => setShowViolations(event.target.checked)} />
            Show DRC violations
          </label>
        </div>
        <p className="text-sm text-ink-soft tabular-nums" aria-live="polite">
          Cells {view.x0}–{view.x0 + view.size - 1} (x) × {view.y0}–{view.y0 + view.size - 1} (y) of {n} × {n}; seen from above the pillars (facing the device from the side the light goes to): x right, y up.
          {region.isFetching ? <Spinner className="ml-2 inline size-3" /> : null}
        </p>
        <div onPointerDown={onPointerDown} onPointerUp={onPointerUp} className="cursor-grab touch-none select-none active:cursor-grabbing">
          {region.data ? <RegionSvg region={region.data} view={view} showViolations={showViolations} focus={focus} /> : null}
          {region.isPending ? <div className="flex aspect-square items-center justify-center rounded-xl bg-paper-deep"><Spinner /></div> : null}
        </div>
        {region.isError ? <Banner title="This region did not load">{region.error.message}</Banner> : null}
        {region.data && showViolations ? (
          <p className="text-sm" data-testid="region-violations">
            {region.data.violations.length === 0 ? 'No design-rule violations in this region.' : `${region.data.violations.length} design-rule violation${region.data.violations.length === 1 ? '' : 's'} in this region, drawn in red (gaps as a line between the two pillars).`}
          </p>
        ) : null}
      </div>
      <Minimap n={n} view={view} onJump={(ix, iy) => onViewChange(viewAround(n, ix, iy, view.size))} />
    </div>
  );
}
