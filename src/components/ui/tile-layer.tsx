import { useEffect, useState } from 'react';
import type { TilePyramid } from '@shared/schemas/tiles';
import type { VisibleRange } from '@/components/ui/picture-axes';

/** A picture stored as a tile pyramid (README "Tile pyramids"): its manifest and the address of each tile. */
export interface TileSource {
  pyramid: TilePyramid;
  tile: (level: number, x: number, y: number) => string;
}

/**
 * The level to draw when the picture is `shownWidth` device pixels wide: the coarsest with at least one of its
 * pixels per device pixel, level 0 (full resolution) when none is that fine. Example: levels 1024, 512, 256
 * shown 600 px wide → level 0; shown 400 px wide → level 1.
 */
export function levelFor(pyramid: TilePyramid, shownWidth: number): number {
  for (let level = pyramid.levels.length - 1; level >= 0; level--) if (pyramid.levels[level].width >= shownWidth) return level;
  return 0;
}

/** Columns and rows of `level` that overlap the part in view (fractions of the picture, as drawn unmirrored). */
export function tilesInView(pyramid: TilePyramid, level: number, view: VisibleRange): { x: number; y: number }[] {
  const { width, height, columns, rows } = pyramid.levels[level];
  const size = pyramid.tileSize;
  const span = (from: number, to: number, side: number, count: number) => {
    const first = Math.max(0, Math.floor((from * side) / size));
    const last = Math.min(count - 1, Math.ceil((to * side) / size) - 1);
    return { first, last };
  };
  const across = span(view.left, view.right, width, columns);
  const down = span(view.top, view.bottom, height, rows);
  const tiles: { x: number; y: number }[] = [];
  for (let y = down.first; y <= down.last; y++) for (let x = across.first; x <= across.last; x++) tiles.push({ x, y });
  return tiles;
}

/**
 * How long the view must stay still before the tiles it needs are asked for, ms: a wheel or pinch zoom passes
 * through many views, and loading each one's tiles would fetch far more than the last one shows (common
 * practice, no published source).
 */
const SETTLE_MS = 150;

interface TileLayerProps {
  source: TileSource;
  /** What the picture shows, for screen readers (the tiles themselves are unnamed parts of it). */
  alt: string;
  /** The part of the picture in view, fractions of its width and height as drawn (unmirrored). */
  view: VisibleRange;
  /** Width of the whole picture on screen, CSS pixels. */
  shownWidth: number;
  /** CSS transform placing the picture in its frame (zoom, pan, mirror), as for a single picture. */
  transform: string;
  /** Draw level 0 as crisp squares (a picture pixel covers more than a screen pixel). */
  pixelated: boolean;
  onFail: () => void;
}

/**
 * A tiled picture: the coarsest level (one tile) always, beneath the tiles in view of the level the zoom
 * needs — so the whole picture shows at once and only what is in view is loaded when zoomed or moved, once
 * the view has settled.
 */
export function TileLayer({ source, alt, view: current, shownWidth: currentWidth, transform, pixelated, onFail }: TileLayerProps) {
  const { pyramid, tile } = source;
  const [settled, setSettled] = useState({ view: current, shownWidth: currentWidth });
  useEffect(() => {
    const timer = setTimeout(() => setSettled({ view: current, shownWidth: currentWidth }), SETTLE_MS);
    return () => clearTimeout(timer);
    // The view's numbers, not the object (made anew on every render).
  }, [current.left, current.right, current.top, current.bottom, currentWidth]);
  const { view, shownWidth } = settled;
  const coarsest = pyramid.levels.length - 1;
  const dpr = typeof window === 'undefined' ? 1 : window.devicePixelRatio || 1;
  const needed = shownWidth > 0 ? levelFor(pyramid, shownWidth * dpr) : coarsest;
  const whole = { left: 0, right: 1, top: 0, bottom: 1 };
  const layers = needed === coarsest ? [coarsest] : [coarsest, needed];
  return (
    <div role="img" aria-label={alt} className="absolute top-0 left-0 h-full w-full origin-top-left" style={{ transform }} data-tile-level={needed}>
      {layers.map((level) => {
        const { width, height } = pyramid.levels[level];
        const size = pyramid.tileSize;
        return tilesInView(pyramid, level, level === coarsest ? whole : view).map(({ x, y }) => (
          <img
            key={`${level}/${x}/${y}`}
            src={tile(level, x, y)}
            alt=""
            draggable={false}
            data-tile={`${level}/${x}/${y}`}
            onError={level === coarsest ? onFail : undefined}
            className="absolute max-w-none"
            style={{
              left: `${((x * size) / width) * 100}%`,
              top: `${((y * size) / height) * 100}%`,
              width: `${(Math.min(size, width - x * size) / width) * 100}%`,
              height: `${(Math.min(size, height - y * size) / height) * 100}%`,
              imageRendering: pixelated && level === 0 ? 'pixelated' : 'auto',
            }}
          />
        ));
      })}
    </div>
  );
}
