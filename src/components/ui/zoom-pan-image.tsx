import { useCallback, useEffect, useId, useRef, useState, type KeyboardEvent, type PointerEvent, type ReactNode } from 'react';
import { PictureAxes, type PictureAxesSpec } from '@/components/ui/picture-axes';
import { TileLayer, type TileSource } from '@/components/ui/tile-layer';

interface View {
  scale: number;
  x: number;
  y: number;
}

/** Where the picture currently sits in its frame, for drawing marks that stay on the same picture point. */
export interface ZoomPanLayer {
  scale: number;
  /** Frame position, in CSS pixels from the frame's top left, of the picture point at fractions (fx, fy) of its width and height. */
  place: (fx: number, fy: number) => { left: number; top: number };
}

/** What a feature adds to one picture: marks over it, a pick handler, controls by its caption and a panel below it. */
export interface PictureAnnotation {
  overlay?: (layer: ZoomPanLayer) => ReactNode;
  onPick?: (point: { x: number; y: number }) => void;
  controls?: ReactNode;
  panel?: ReactNode;
}

interface ZoomPanImageProps {
  src: string;
  /** Marks drawn over the picture; they move with zoom and pan but keep their own size. */
  overlay?: (layer: ZoomPanLayer) => ReactNode;
  /** When set, a click (not a drag) on the picture reports the point as fractions 0…1 of its width and height. */
  onPick?: (point: { x: number; y: number }) => void;
  alt: string;
  /** Height / width before the picture has loaded. */
  aspect?: number;
  maxScale?: number;
  className?: string;
  /** Labelled axes drawn around the picture, following zoom and pan (README "Picture convention"). */
  axes?: PictureAxesSpec;
  /** Shows the picture mirrored left to right (display only); marks and picks keep the picture's own coordinates. */
  mirrored?: boolean;
  /** The picture as a tile pyramid: drawn from tiles instead of `src` (which stays the fallback if they fail). */
  tiles?: TileSource;
}

const START: View = { scale: 1, x: 0, y: 0 };
const STEP = 1.5;

/**
 * A picture that can be looked at closely: wheel or pinch to zoom about the pointer, drag to pan, double
 * click to zoom in, buttons for +, − and fit. Keyboard: + and − zoom, arrows pan, 0 fits. Once a picture
 * pixel covers more than a screen pixel it is drawn as crisp squares, so single cells stay visible.
 */
export function ZoomPanImage({ src, alt, aspect = 1, maxScale = 32, className = '', overlay, onPick, axes, mirrored = false, tiles }: ZoomPanImageProps) {
  const frameRef = useRef<HTMLDivElement>(null);
  const pointers = useRef(new Map<number, { x: number; y: number }>());
  const pressedAt = useRef<{ x: number; y: number } | null>(null);
  const [view, setView] = useState<View>(START);
  const [natural, setNatural] = useState<{ width: number; height: number } | null>(null);
  const [frameWidth, setFrameWidth] = useState(0);
  const [failed, setFailed] = useState(false);
  const [tilesFailed, setTilesFailed] = useState(false);
  const hintId = useId();
  const tiled = tiles && !tilesFailed ? tiles : undefined;
  const size = tiled ? { width: tiled.pyramid.width, height: tiled.pyramid.height } : natural;

  useEffect(() => {
    setView(START);
    setFailed(false);
    setTilesFailed(false);
  }, [src]);

  useEffect(() => {
    const frame = frameRef.current;
    if (!frame) return;
    const observer = new ResizeObserver(([entry]) => setFrameWidth(entry.contentRect.width));
    observer.observe(frame);
    return () => observer.disconnect();
  }, []);

  const frameSize = () => {
    const rect = frameRef.current?.getBoundingClientRect();
    return rect ? { width: rect.width, height: rect.height, left: rect.left, top: rect.top } : { width: 1, height: 1, left: 0, top: 0 };
  };

  const clampView = useCallback(
    (next: View): View => {
      const { width, height } = frameSize();
      const scale = Math.min(maxScale, Math.max(1, next.scale));
      return {
        scale,
        x: Math.min(0, Math.max(width - width * scale, next.x)),
        y: Math.min(0, Math.max(height - height * scale, next.y)),
      };
    },
    [maxScale],
  );

  /** Zooms by `factor` keeping the frame point (px, py) still. */
  const zoomAt = useCallback(
    (factor: number, px: number, py: number) =>
      setView((current) => {
        const scale = Math.min(maxScale, Math.max(1, current.scale * factor));
        const k = scale / current.scale;
        return clampView({ scale, x: px - (px - current.x) * k, y: py - (py - current.y) * k });
      }),
    [clampView, maxScale],
  );

  const zoomCentre = (factor: number) => {
    const { width, height } = frameSize();
    zoomAt(factor, width / 2, height / 2);
  };

  const panBy = (dx: number, dy: number) => setView((current) => clampView({ ...current, x: current.x + dx, y: current.y + dy }));

  useEffect(() => {
    const frame = frameRef.current;
    if (!frame) return;
    const onWheel = (event: WheelEvent) => {
      // At full view, scrolling down keeps scrolling the page instead of being swallowed by the picture.
      if (event.deltaY > 0 && frame.dataset.scale === '1') return;
      event.preventDefault();
      const rect = frame.getBoundingClientRect();
      const delta = event.deltaMode === 1 ? event.deltaY * 16 : event.deltaY;
      zoomAt(Math.exp(-delta * 0.0025), event.clientX - rect.left, event.clientY - rect.top);
    };
    frame.addEventListener('wheel', onWheel, { passive: false });
    return () => frame.removeEventListener('wheel', onWheel);
  }, [zoomAt]);

  const onPointerDown = (event: PointerEvent<HTMLDivElement>) => {
    if (event.pointerType === 'mouse' && event.button !== 0) return;
    event.currentTarget.setPointerCapture(event.pointerId);
    pointers.current.set(event.pointerId, { x: event.clientX, y: event.clientY });
    pressedAt.current = pointers.current.size === 1 ? { x: event.clientX, y: event.clientY } : null;
  };

  const onPointerMove = (event: PointerEvent<HTMLDivElement>) => {
    const previous = pointers.current.get(event.pointerId);
    if (!previous) return;
    const all = [...pointers.current.entries()];
    if (all.length === 1) {
      panBy(event.clientX - previous.x, event.clientY - previous.y);
    } else if (all.length === 2) {
      const other = all.find(([id]) => id !== event.pointerId)![1];
      const before = Math.hypot(previous.x - other.x, previous.y - other.y);
      const after = Math.hypot(event.clientX - other.x, event.clientY - other.y);
      const { left, top } = frameSize();
      if (before > 0) zoomAt(after / before, (event.clientX + other.x) / 2 - left, (event.clientY + other.y) / 2 - top);
      panBy((event.clientX - previous.x) / 2, (event.clientY - previous.y) / 2);
    }
    pointers.current.set(event.pointerId, { x: event.clientX, y: event.clientY });
  };

  const onPointerEnd = (event: PointerEvent<HTMLDivElement>) => {
    pointers.current.delete(event.pointerId);
    const pressed = pressedAt.current;
    pressedAt.current = null;
    if (!onPick || !pressed || event.type !== 'pointerup' || Math.hypot(event.clientX - pressed.x, event.clientY - pressed.y) > 4) return;
    const { width, height, left, top } = frameSize();
    const clamp = (v: number) => Math.min(1, Math.max(0, v));
    const across = clamp((event.clientX - left - view.x) / (width * view.scale));
    onPick({
      x: mirrored ? 1 - across : across,
      y: clamp((event.clientY - top - view.y) / (height * view.scale)),
    });
  };

  const onKeyDown = (event: KeyboardEvent<HTMLDivElement>) => {
    if (event.target !== event.currentTarget) return;
    const { width, height } = frameSize();
    const actions: Record<string, () => void> = {
      '+': () => zoomCentre(STEP),
      '=': () => zoomCentre(STEP),
      '-': () => zoomCentre(1 / STEP),
      _: () => zoomCentre(1 / STEP),
      '0': () => setView(START),
      ArrowLeft: () => panBy(width * 0.1, 0),
      ArrowRight: () => panBy(-width * 0.1, 0),
      ArrowUp: () => panBy(0, height * 0.1),
      ArrowDown: () => panBy(0, -height * 0.1),
    };
    const action = actions[event.key];
    if (!action || event.altKey || event.ctrlKey || event.metaKey) return;
    event.preventDefault();
    action();
  };

  const ratio = size ? size.height / size.width : aspect;
  const magnification = size && frameWidth > 0 ? (frameWidth * view.scale) / size.width : 0;
  const transform = `translate(${view.x}px, ${view.y}px) scale(${view.scale})${mirrored ? ' translateX(100%) scaleX(-1)' : ''}`;
  const zoomed = view.scale > 1;
  const frameHeight = frameWidth * ratio;
  // The part of the picture in view, as fractions of its width and height.
  const visible = {
    left: frameWidth > 0 ? -view.x / (frameWidth * view.scale) : 0,
    right: frameWidth > 0 ? (frameWidth - view.x) / (frameWidth * view.scale) : 1,
    top: frameHeight > 0 ? -view.y / (frameHeight * view.scale) : 0,
    bottom: frameHeight > 0 ? (frameHeight - view.y) / (frameHeight * view.scale) : 1,
  };
  const frame = (
      <div
        ref={frameRef}
        tabIndex={0}
        role="group"
        aria-roledescription="zoomable picture"
        aria-label={alt}
        aria-describedby={hintId}
        data-scale={view.scale === 1 ? '1' : 'zoomed'}
        onPointerDown={onPointerDown}
        onPointerMove={onPointerMove}
        onPointerUp={onPointerEnd}
        onPointerCancel={onPointerEnd}
        onDoubleClick={(event) => {
          if (onPick) return;
          const rect = event.currentTarget.getBoundingClientRect();
          zoomAt(2, event.clientX - rect.left, event.clientY - rect.top);
        }}
        onKeyDown={onKeyDown}
        className={`relative w-full touch-none overflow-hidden rounded-xl bg-ink-deep ring-1 ring-line select-none ${
          onPick ? 'cursor-crosshair' : zoomed ? 'cursor-grab active:cursor-grabbing' : 'cursor-zoom-in'
        }`}
        style={{ aspectRatio: `1 / ${ratio}` }}
      >
        {failed ? (
          <p className="absolute inset-0 flex items-center justify-center p-4 text-center text-sm text-ink-mist">
            The picture did not load. Try the download link, or reload the page.
          </p>
        ) : tiled ? (
          <TileLayer
            source={tiled}
            alt={alt}
            // The part in view as the picture is drawn, before mirroring.
            view={mirrored ? { ...visible, left: 1 - visible.right, right: 1 - visible.left } : visible}
            shownWidth={frameWidth * view.scale}
            transform={transform}
            pixelated={magnification > 1}
            onFail={() => setTilesFailed(true)}
          />
        ) : (
          <img
            src={src}
            alt={alt}
            draggable={false}
            onLoad={(event) => setNatural({ width: event.currentTarget.naturalWidth, height: event.currentTarget.naturalHeight })}
            onError={() => setFailed(true)}
            className="absolute top-0 left-0 h-full w-full origin-top-left"
            style={{
              transform,
              imageRendering: magnification > 1 ? 'pixelated' : 'auto',
            }}
          />
        )}
        {overlay && !failed ? (
          <div className="pointer-events-none absolute inset-0">
            {overlay({
              scale: view.scale,
              place: (fx, fy) => ({ left: view.x + (mirrored ? 1 - fx : fx) * frameWidth * view.scale, top: view.y + fy * frameWidth * ratio * view.scale }),
            })}
          </div>
        ) : null}
      </div>
  );

  return (
    <div className={`flex flex-col gap-2 ${className}`}>
      {axes ? (
        <PictureAxes spec={axes} mirrored={mirrored} visible={visible}>
          {frame}
        </PictureAxes>
      ) : (
        frame
      )}
      <div className="flex flex-wrap items-center gap-2">
        <div className="inline-flex overflow-hidden rounded-full ring-1 ring-line-strong ring-inset">
          <button
            type="button"
            onClick={() => zoomCentre(1 / STEP)}
            disabled={view.scale <= 1}
            aria-label={`Zoom out of ${alt}`}
            className="h-8 w-9 font-extrabold hover:bg-paper-deep disabled:opacity-40"
          >
            −
          </button>
          <button
            type="button"
            onClick={() => setView(START)}
            disabled={!zoomed}
            aria-label={`${Math.round(view.scale * 100)} %: fit ${alt} to the frame`}
            className="h-8 border-x border-line-strong px-3 text-xs font-bold tabular-nums hover:bg-paper-deep disabled:opacity-60"
          >
            {Math.round(view.scale * 100)} %
          </button>
          <button
            type="button"
            onClick={() => zoomCentre(STEP)}
            disabled={view.scale >= maxScale}
            aria-label={`Zoom into ${alt}`}
            className="h-8 w-9 font-extrabold hover:bg-paper-deep disabled:opacity-40"
          >
            +
          </button>
        </div>
        <p id={hintId} className="text-xs text-ink-soft">
          Wheel, pinch or + / − to zoom; drag or arrow keys to move; 0 or the percent button to fit.
          {size ? ` ${size.width} × ${size.height} px${tiled ? ', loaded in tiles as you zoom' : ''}.` : ''}
        </p>
      </div>
    </div>
  );
}
