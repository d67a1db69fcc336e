import { Fragment } from 'react';
import type { ZoomPanLayer } from '@/components/ui/zoom-pan-image';

/** Screen pixels between a pin's corner and the point it marks. */
const PIN_GAP = 6;

interface Pin {
  id: number;
  number: number;
  x: number;
  y: number;
  resolved: boolean;
  /** The place in the picture's own coordinates, when it has them. */
  place?: string | null;
}

interface PinLayerProps {
  layer: ZoomPanLayer;
  pins: Pin[];
  openId: number | null;
  draft: { x: number; y: number } | null;
  onOpen: (id: number) => void;
}

/**
 * Numbered pins at their picture points: a small open ring on the point itself, and the pin just above and to
 * the right of it, its pointed corner towards the ring — so the pin never hides what it marks, at any zoom.
 */
export function PinLayer({ layer, pins, openId, draft, onOpen }: PinLayerProps) {
  return (
    <>
      {pins.map((pin) => {
        const { left, top } = layer.place(pin.x, pin.y);
        const open = pin.id === openId;
        const name = `Thread ${pin.number}${pin.place ? ` at ${pin.place}` : ''}`;
        return (
          <Fragment key={pin.id}>
          <span aria-hidden="true" style={{ left, top }} className={`pointer-events-none absolute size-2.5 -translate-x-1/2 -translate-y-1/2 rounded-full ring-2 ${open ? 'ring-ember' : 'ring-card'}`} />
          <button
            id={`review-pin-${pin.id}`}
            type="button"
            aria-label={name}
            aria-expanded={open}
            title={pin.resolved ? `${name} (resolved)` : name}
            onPointerDown={(event) => event.stopPropagation()}
            onDoubleClick={(event) => event.stopPropagation()}
            onClick={() => onOpen(pin.id)}
            style={{ left: left + PIN_GAP, top: top - PIN_GAP }}
            className={`pointer-events-auto absolute flex size-7 -translate-y-full items-center justify-center rounded-full rounded-bl-none text-xs font-extrabold shadow-lg ring-2 ${
              open ? 'z-10 bg-ember text-ink ring-card' : pin.resolved ? 'bg-ink-mist text-ink ring-card/70' : 'bg-teal text-card ring-card'
            }`}
          >
            {pin.number}
          </button>
          </Fragment>
        );
      })}
      {draft ? (
        <span
          aria-hidden="true"
          style={{ left: layer.place(draft.x, draft.y).left + PIN_GAP, top: layer.place(draft.x, draft.y).top - PIN_GAP }}
          className="absolute size-7 -translate-y-full animate-pulse rounded-full rounded-bl-none bg-ember ring-2 ring-card"
        />
      ) : null}
    </>
  );
}
