import type { ZoomPanLayer } from '@/components/ui/zoom-pan-image';

interface Pin {
  id: number;
  number: number;
  x: number;
  y: number;
  resolved: boolean;
}

interface PinLayerProps {
  layer: ZoomPanLayer;
  pins: Pin[];
  openId: number | null;
  draft: { x: number; y: number } | null;
  onOpen: (id: number) => void;
}

/** Numbered pins at their picture points; each pin's pointed bottom-left corner sits on its point at any zoom. */
export function PinLayer({ layer, pins, openId, draft, onOpen }: PinLayerProps) {
  return (
    <>
      {pins.map((pin) => {
        const { left, top } = layer.place(pin.x, pin.y);
        const open = pin.id === openId;
        return (
          <button
            key={pin.id}
            id={`review-pin-${pin.id}`}
            type="button"
            aria-label={`Thread ${pin.number}`}
            aria-expanded={open}
            title={pin.resolved ? `Thread ${pin.number} (resolved)` : `Thread ${pin.number}`}
            onPointerDown={(event) => event.stopPropagation()}
            onDoubleClick={(event) => event.stopPropagation()}
            onClick={() => onOpen(pin.id)}
            style={{ left, top }}
            className={`pointer-events-auto absolute flex size-7 -translate-y-full items-center justify-center rounded-full rounded-bl-none text-xs font-extrabold shadow-lg ring-2 ${
              open ? 'z-10 bg-ember text-ink ring-card' : pin.resolved ? 'bg-ink-mist text-ink ring-card/70' : 'bg-teal text-card ring-card'
            }`}
          >
            {pin.number}
          </button>
        );
      })}
      {draft ? (
        <span
          aria-hidden="true"
          style={layer.place(draft.x, draft.y)}
          className="absolute size-7 -translate-y-full animate-pulse rounded-full rounded-bl-none bg-ember ring-2 ring-card"
        />
      ) : null}
    </>
  );
}
