import { useId, useRef, useState, type FormEvent, type KeyboardEvent } from 'react';
import { COMMENT_MAX_LENGTH } from '@shared/schemas/review';
import { Button } from '@/components/ui/button';

export interface MentionCandidate {
  userId: number;
  name: string;
}

interface CommentBoxProps {
  label: string;
  submitLabel: string;
  members: MentionCandidate[];
  pending?: boolean;
  error?: string | null;
  initial?: string;
  autoFocus?: boolean;
  onSubmit: (body: string) => Promise<unknown>;
  onCancel?: () => void;
}

const fold = (s: string) => s.normalize('NFD').replace(/\p{M}/gu, '').toLowerCase();

/** The `@…` being typed just before the caret, if any: where it starts and what follows the `@`. */
function mentionAt(text: string, caret: number): { start: number; query: string } | null {
  const before = text.slice(0, caret);
  const at = before.lastIndexOf('@');
  if (at < 0 || (at > 0 && !/\s/.test(before[at - 1]))) return null;
  const query = before.slice(at + 1);
  if (query.length > 40 || /[\n@]/.test(query) || /\s\s/.test(query)) return null;
  return { start: at, query };
}

/** Plain-text comment field; typing `@` offers the project's members and inserts `@Full Name`. */
export function CommentBox({ label, submitLabel, members, pending, error, initial = '', autoFocus, onSubmit, onCancel }: CommentBoxProps) {
  const [body, setBody] = useState(initial);
  const [caret, setCaret] = useState(initial.length);
  const [dismissedAt, setDismissedAt] = useState<number | null>(null);
  const [active, setActive] = useState(0);
  const textRef = useRef<HTMLTextAreaElement>(null);
  const id = useId();

  const mention = mentionAt(body, caret);
  const matches =
    mention && dismissedAt !== mention.start
      ? members.filter((m) => fold(m.name).startsWith(fold(mention.query)) || fold(m.name).includes(` ${fold(mention.query)}`)).slice(0, 8)
      : [];
  const open = matches.length > 0;
  const activeIndex = Math.min(active, matches.length - 1);

  const track = (element: HTMLTextAreaElement) => setCaret(element.selectionStart ?? element.value.length);

  const insert = (member: MentionCandidate) => {
    if (!mention) return;
    const text = `${body.slice(0, mention.start)}@${member.name} ${body.slice(caret)}`;
    const nextCaret = mention.start + member.name.length + 2;
    setBody(text);
    setCaret(nextCaret);
    setActive(0);
    requestAnimationFrame(() => {
      textRef.current?.focus();
      textRef.current?.setSelectionRange(nextCaret, nextCaret);
    });
  };

  const onKeyDown = (event: KeyboardEvent<HTMLTextAreaElement>) => {
    if (!open) return;
    const moves: Record<string, () => void> = {
      ArrowDown: () => setActive((activeIndex + 1) % matches.length),
      ArrowUp: () => setActive((activeIndex - 1 + matches.length) % matches.length),
      Enter: () => insert(matches[activeIndex]),
      Tab: () => insert(matches[activeIndex]),
      Escape: () => setDismissedAt(mention!.start),
    };
    const move = moves[event.key];
    if (!move || event.shiftKey || event.altKey || event.ctrlKey || event.metaKey) return;
    event.preventDefault();
    event.stopPropagation();
    move();
  };

  const submit = async (event: FormEvent) => {
    event.preventDefault();
    if (!body.trim()) return;
    try {
      await onSubmit(body);
    } catch {
      return;
    }
    setBody('');
    setCaret(0);
  };

  return (
    <form onSubmit={(event) => void submit(event)} className="flex flex-col gap-2">
      <label htmlFor={`${id}-text`} className="text-sm font-bold text-ink">
        {label}
      </label>
      <div className="relative">
        <textarea
          id={`${id}-text`}
          ref={textRef}
          value={body}
          autoFocus={autoFocus}
          maxLength={COMMENT_MAX_LENGTH}
          rows={3}
          onChange={(event) => {
            setBody(event.target.value);
            track(event.target);
            setActive(0);
          }}
          onSelect={(event) => track(event.currentTarget)}
          onKeyDown={onKeyDown}
          aria-controls={open ? `${id}-members` : undefined}
          aria-activedescendant={open ? `${id}-member-${matches[activeIndex].userId}` : undefined}
          aria-describedby={`${id}-hint`}
          className="min-h-20 w-full rounded-xl bg-card px-3 py-2 text-sm text-ink ring-1 ring-line-strong ring-inset focus:ring-2 focus:ring-teal focus:outline-none"
        />
        {open ? (
          <ul
            id={`${id}-members`}
            role="listbox"
            aria-label="Project members to mention"
            className="absolute top-full left-0 z-20 mt-1 max-h-56 w-64 overflow-auto rounded-xl bg-card py-1 shadow-card ring-1 ring-line"
          >
            {matches.map((member, index) => (
              <li
                key={member.userId}
                id={`${id}-member-${member.userId}`}
                role="option"
                aria-selected={index === activeIndex}
                onMouseDown={(event) => {
                  event.preventDefault();
                  insert(member);
                }}
                className={`cursor-pointer px-3 py-1.5 text-sm ${index === activeIndex ? 'bg-teal-wash font-bold text-teal' : 'text-ink'}`}
              >
                {member.name}
              </li>
            ))}
          </ul>
        ) : null}
      </div>
      <p id={`${id}-hint`} className="text-xs text-ink-soft">
        Plain text. Type @ to mention a project member — arrow keys choose, Enter inserts, Escape closes the list.
      </p>
      <p className="sr-only" aria-live="polite">
        {open ? `${matches.length} member${matches.length === 1 ? '' : 's'} to mention: ${matches[activeIndex].name} chosen` : ''}
      </p>
      {error ? <p className="text-sm font-semibold text-danger">{error}</p> : null}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" size="sm" pending={pending} disabled={!body.trim()}>
          {submitLabel}
        </Button>
        {onCancel ? (
          <Button variant="quiet" size="sm" onClick={onCancel}>
            Cancel
          </Button>
        ) : null}
      </div>
    </form>
  );
}
