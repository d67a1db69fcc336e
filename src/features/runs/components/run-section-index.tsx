import { useEffect, useRef, useState, type MouseEvent, type ReactNode } from 'react';
import { Link } from 'react-router-dom';

/** The sections of a run page in reading order: the element id each one wraps, and its name in the index. */
export const RUN_SECTIONS = [
  { id: 'summary', label: 'Summary' },
  { id: 'far-fields', label: 'Far fields' },
  { id: 'maps', label: 'Maps' },
  { id: 'beams', label: 'Beams' },
  { id: 'mapping', label: 'Mapping' },
  { id: 'design-rules', label: 'Design rules' },
  { id: 'fabrication-sweep', label: 'Fabrication sweep' },
  { id: 'metrics', label: 'Metrics' },
  { id: 'files', label: 'Files' },
  { id: 'review', label: 'Review' },
] as const;

export type RunSectionId = (typeof RUN_SECTIONS)[number]['id'];

/** Space the sticky index takes at the top of the window; sections scroll to just below it. */
const SECTION_CLASSES = 'scroll-mt-20 empty:hidden';

/** One section of the run page, the target of its index link (`#id`); an empty one is hidden and left out of the index. */
export function RunSection({ id, children, className = '' }: { id: RunSectionId; children: ReactNode; className?: string }) {
  return (
    <div id={id} data-run-section="" className={`${SECTION_CLASSES} ${className}`}>
      {children}
    </div>
  );
}

const present = () => RUN_SECTIONS.filter(({ id }) => (document.getElementById(id)?.childElementCount ?? 0) > 0).map(({ id }) => id);

/**
 * Sticky index of the run page's sections with deep links (`…/runs/12#metrics`): it lists the sections the
 * page shows, marks the one being read, and scrolls to the address's section once it has appeared.
 */
export function RunSectionIndex({ compareHref }: { compareHref: string }) {
  const [shown, setShown] = useState<RunSectionId[]>([]);
  const [current, setCurrent] = useState<RunSectionId | null>(null);
  const navRef = useRef<HTMLElement>(null);
  const scrolledTo = useRef<string | null>(null);

  // Which sections have content: they come and go as the run finishes and its parts load.
  useEffect(() => {
    const page = navRef.current?.parentElement;
    if (!page) return;
    let frame = 0;
    const update = () => {
      frame = 0;
      const next = present();
      setShown((before) => (before.join() === next.join() ? before : next));
    };
    update();
    const observer = new MutationObserver(() => {
      if (!frame) frame = requestAnimationFrame(update);
    });
    observer.observe(page, { childList: true, subtree: true });
    return () => {
      observer.disconnect();
      if (frame) cancelAnimationFrame(frame);
    };
  }, []);

  // A deep link: scroll to its section as soon as it is there, and once more after pictures above it settle.
  useEffect(() => {
    const target = decodeURIComponent(window.location.hash.slice(1));
    if (!target || scrolledTo.current === target || !shown.includes(target as RunSectionId)) return;
    scrolledTo.current = target;
    const scroll = () => document.getElementById(target)?.scrollIntoView({ block: 'start' });
    scroll();
    const timer = window.setTimeout(scroll, 400);
    return () => window.clearTimeout(timer);
  }, [shown]);

  // The section being read: the first, in reading order, that spans the line just below the index (the
  // review column sits beside the far fields, which come first); between sections, the nearest one above.
  useEffect(() => {
    const onScroll = () => {
      const probe = 120;
      let active: RunSectionId | null = null;
      let nearest = -Infinity;
      let above: RunSectionId | null = null;
      for (const id of shown) {
        const rect = document.getElementById(id)?.getBoundingClientRect();
        if (!rect) continue;
        if (rect.top <= probe && rect.bottom > probe) {
          active = id;
          break;
        }
        if (rect.top <= probe && rect.top > nearest) {
          nearest = rect.top;
          above = id;
        }
      }
      setCurrent(active ?? above ?? shown[0] ?? null);
    };
    onScroll();
    window.addEventListener('scroll', onScroll, { passive: true });
    return () => window.removeEventListener('scroll', onScroll);
  }, [shown]);

  const jump = (event: MouseEvent<HTMLAnchorElement>, id: RunSectionId) => {
    event.preventDefault();
    scrolledTo.current = id;
    window.history.replaceState(window.history.state, '', `#${id}`);
    document.getElementById(id)?.scrollIntoView({ block: 'start', behavior: 'smooth' });
    setCurrent(id);
  };

  return (
    <nav
      ref={navRef}
      aria-label="Sections of this run"
      className="sticky top-0 z-20 -mx-2 -mb-2 flex items-center gap-3 rounded-2xl bg-paper/95 px-2 py-2.5 backdrop-blur"
    >
      <ul className="flex min-w-0 flex-1 gap-0.5 overflow-x-auto">
        {RUN_SECTIONS.filter(({ id }) => shown.includes(id)).map(({ id, label }) => (
          <li key={id} className="shrink-0">
            <a
              href={`#${id}`}
              onClick={(event) => jump(event, id)}
              aria-current={current === id ? 'location' : undefined}
              className={`block rounded-full px-2.5 py-1.5 text-sm font-bold whitespace-nowrap transition-colors ${
                current === id ? 'bg-ink text-card' : 'text-ink-soft hover:bg-paper-deep hover:text-ink'
              }`}
            >
              {label}
            </a>
          </li>
        ))}
      </ul>
      <Link
        to={compareHref}
        aria-label="Compare with another run"
        title="Compare this run with another run of the project"
        className="shrink-0 rounded-full px-3 py-1.5 text-sm font-bold whitespace-nowrap text-teal ring-1 ring-line hover:bg-paper-deep"
      >
        Compare
      </Link>
    </nav>
  );
}
