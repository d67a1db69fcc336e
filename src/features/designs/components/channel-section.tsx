import { useEffect, useRef, useState } from 'react';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PlusIcon } from '@/components/ui/icons';
import { DesignText, GroupError } from '@/features/designs/components/design-inputs';
import { LaserSafetyNote } from '@/features/designs/components/laser-safety-note';
import { PhasePreview } from '@/features/designs/components/phase-preview';
import { TermFields } from '@/features/designs/components/term-fields';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';
import {
  CHANNEL_NAMES,
  TERM_KINDS,
  termKindLabel,
  type ChannelId,
  type DraftTerm,
  type TermKind,
} from '@/features/designs/utils/design-draft';

const MAX_TERMS = 12;

function AddTermMenu({ channel, disabled }: { channel: ChannelId; disabled: boolean }) {
  const addTerm = useDesignEditor((state) => state.addTerm);
  const [open, setOpen] = useState(false);
  const rootRef = useRef<HTMLDivElement>(null);
  const menuId = `add-term-${channel}`;

  useEffect(() => {
    if (!open) return;
    rootRef.current?.querySelector<HTMLButtonElement>('[role="menuitem"]')?.focus();
    const close = (event: MouseEvent) => {
      if (!rootRef.current?.contains(event.target as Node)) setOpen(false);
    };
    document.addEventListener('mousedown', close);
    return () => document.removeEventListener('mousedown', close);
  }, [open]);

  function choose(kind: TermKind) {
    addTerm(channel, kind);
    setOpen(false);
    requestAnimationFrame(() => {
      const cards = document.querySelectorAll<HTMLElement>(`[data-channel-terms="${channel}"] > li`);
      cards[cards.length - 1]?.querySelector<HTMLElement>('h3')?.focus();
    });
  }

  function onMenuKey(event: React.KeyboardEvent<HTMLDivElement>) {
    const items = Array.from(rootRef.current?.querySelectorAll<HTMLButtonElement>('[role="menuitem"]') ?? []);
    const index = items.indexOf(document.activeElement as HTMLButtonElement);
    if (event.key === 'Escape') {
      event.preventDefault();
      setOpen(false);
      rootRef.current?.querySelector<HTMLButtonElement>('[aria-haspopup]')?.focus();
    } else if (event.key === 'ArrowDown' || event.key === 'ArrowUp') {
      event.preventDefault();
      const next = (index + (event.key === 'ArrowDown' ? 1 : -1) + items.length) % items.length;
      items[next]?.focus();
    } else if (event.key === 'Home' || event.key === 'End') {
      event.preventDefault();
      items[event.key === 'Home' ? 0 : items.length - 1]?.focus();
    } else if (event.key === 'Tab') {
      setOpen(false);
    }
  }

  return (
    <div ref={rootRef} className="relative">
      <Button
        variant="secondary"
        size="sm"
        icon={<PlusIcon className="size-4" />}
        aria-haspopup="menu"
        aria-expanded={open}
        aria-controls={open ? menuId : undefined}
        disabled={disabled}
        onClick={() => setOpen((value) => !value)}
      >
        Add term to {CHANNEL_NAMES[channel]}
      </Button>
      {open ? (
        <div
          id={menuId}
          role="menu"
          aria-label={`Kinds of term for ${CHANNEL_NAMES[channel]}`}
          onKeyDown={onMenuKey}
          className="absolute left-0 z-20 mt-2 flex w-80 flex-col rounded-2xl bg-card p-1.5 shadow-2xl ring-1 ring-line"
        >
          {TERM_KINDS.map((entry) => (
            <button
              key={entry.kind}
              type="button"
              role="menuitem"
              tabIndex={-1}
              onClick={() => choose(entry.kind)}
              className="rounded-xl px-3 py-2 text-left hover:bg-paper focus:bg-paper focus:outline-none"
            >
              <span className="block text-sm font-bold">{entry.label}</span>
              <span className="block text-xs text-ink-soft">{entry.description}</span>
            </button>
          ))}
        </div>
      ) : null}
    </div>
  );
}

interface TermCardProps {
  projectId: number;
  channel: ChannelId;
  index: number;
  count: number;
  term: DraftTerm;
  readOnly: boolean;
}

function TermCard({ projectId, channel, index, count, term, readOnly }: TermCardProps) {
  const moveTerm = useDesignEditor((state) => state.moveTerm);
  const removeTerm = useDesignEditor((state) => state.removeTerm);
  const name = `term ${index + 1} (${termKindLabel(term.kind)})`;
  const path = ['channels', channel, 'terms', index] as const;
  const dataField = path.join('.');

  function move(offset: -1 | 1) {
    moveTerm(channel, index, offset);
    const target = index + offset;
    const which = offset < 0 ? 'up' : 'down';
    requestAnimationFrame(() => {
      const card = document.querySelector<HTMLElement>(`[data-field="channels.${channel}.terms.${target}"]`);
      const button = card?.querySelector<HTMLButtonElement>(`[data-move="${which}"]`);
      (button && !button.disabled ? button : card?.querySelector<HTMLButtonElement>('[data-move]:not(:disabled)'))?.focus();
    });
  }

  return (
    <li data-field={dataField} className="rounded-2xl bg-card p-4 ring-1 ring-line">
      <div className="mb-4 flex flex-wrap items-center justify-between gap-2">
        <h3 tabIndex={-1} className="flex items-center gap-2 font-extrabold focus:outline-none">
          <span className="flex size-7 items-center justify-center rounded-full bg-ink text-sm text-card">{index + 1}</span>
          {termKindLabel(term.kind)}
        </h3>
        {readOnly ? null : (
          <div className="flex gap-1">
            <Button variant="quiet" size="sm" data-move="up" disabled={index === 0} onClick={() => move(-1)} aria-label={`Move ${name} up`}>
              ↑ Up
            </Button>
            <Button
              variant="quiet"
              size="sm"
              data-move="down"
              disabled={index === count - 1}
              onClick={() => move(1)}
              aria-label={`Move ${name} down`}
            >
              ↓ Down
            </Button>
            <Button
              variant="danger"
              size="sm"
              onClick={() => {
                removeTerm(channel, index);
                requestAnimationFrame(() => document.querySelector<HTMLElement>(`[data-add-term="${channel}"] button`)?.focus());
              }}
              aria-label={`Remove ${name}`}
            >
              Remove
            </Button>
          </div>
        )}
      </div>
      <TermFields projectId={projectId} path={path} term={term} canUpload={!readOnly} />
      <div className="mt-3">
        <GroupError path={path} />
      </div>
    </li>
  );
}

/** The phase-retrieval algorithms an image hologram offers, where they were published. */
const RETRIEVAL_REFERENCES = [
  'Gerchberg–Saxton: R. W. Gerchberg and W. O. Saxton, Optik 35, 237 (1972).',
  'Weighted Gerchberg–Saxton: R. Di Leonardo, F. Ianni and G. Ruocco, Opt. Express 15, 1913 (2007).',
  'MRAF: M. Pasienski and B. DeMarco, Opt. Express 16, 2176 (2008).',
];

export function ChannelSection({ projectId, channel, readOnly }: { projectId: number; channel: ChannelId; readOnly: boolean }) {
  const recipe = useDesignEditor((state) => state.draft?.channels[channel]);
  const setup = useDesignEditor((state) => state.draft?.setup);
  const ids = useDesignEditor((state) => state.termIds[channel]);
  if (!recipe || !setup) return null;
  const terms = recipe.terms;
  const concentrates = terms.some((term) => term.kind === 'axicon' || term.kind === 'lens');
  const stateName = channel === 'a' ? 'state A' : 'state B';

  return (
    <Card
      title={CHANNEL_NAMES[channel]}
      description={`Phase recipe for light in ${stateName}: the terms are added in this order.`}
      headingLevel="h2"
      references={terms.some((term) => term.kind === 'hologram') ? RETRIEVAL_REFERENCES : undefined}
    >
      <div data-field={`channels.${channel}`} className="flex flex-col gap-5">
        <DesignText path={['channels', channel, 'label']} label={`${CHANNEL_NAMES[channel]} label`} maxLength={80} hint="Optional, e.g. “Bessel beam under x-polarized light”." />
        {concentrates ? <LaserSafetyNote /> : null}
        <div className="grid gap-5 xl:grid-cols-[minmax(0,1fr)_16rem] min-[1400px]:grid-cols-1">
          <div data-field={`channels.${channel}.terms`} className="flex min-w-0 flex-col gap-3">
            {terms.length ? (
              <ol data-channel-terms={channel} className="flex flex-col gap-3" aria-label={`${CHANNEL_NAMES[channel]} terms`}>
                {terms.map((term, index) => (
                  <TermCard
                    key={ids[index] ?? index}
                    projectId={projectId}
                    channel={channel}
                    index={index}
                    count={terms.length}
                    term={term}
                    readOnly={readOnly}
                  />
                ))}
              </ol>
            ) : (
              <p className="rounded-2xl border-2 border-dashed border-line px-4 py-6 text-center text-sm text-ink-soft">
                No terms yet. A channel needs at least one.
              </p>
            )}
            <GroupError path={['channels', channel, 'terms']} />
            {readOnly ? null : (
              <div data-add-term={channel} className="flex flex-wrap items-center gap-3">
                <AddTermMenu channel={channel} disabled={terms.length >= MAX_TERMS} />
                {terms.length >= MAX_TERMS ? <span className="text-xs text-ink-soft">At most {MAX_TERMS} terms per channel.</span> : null}
              </div>
            )}
          </div>
          <div className="flex flex-col gap-2 self-start xl:sticky xl:top-28 min-[1400px]:hidden">
            <h3 className="text-sm font-bold">Phase preview</h3>
            <PhasePreview setup={setup} terms={terms} channelName={CHANNEL_NAMES[channel]} />
          </div>
        </div>
      </div>
    </Card>
  );
}
