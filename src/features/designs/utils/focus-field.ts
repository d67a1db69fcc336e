const FOCUSABLE = 'input:not([type="hidden"]), select, textarea, button';

/**
 * Moves focus to the control of a dotted design path (elements carry `data-field`); when that exact field
 * is not on screen, to the nearest enclosing one (a term, a channel, a section).
 */
export function focusField(path: string): boolean {
  const parts = path ? path.split('.') : [];
  for (let length = parts.length; length >= 0; length--) {
    const key = parts.slice(0, length).join('.');
    const holder = document.querySelector<HTMLElement>(`[data-field="${CSS.escape(key)}"]`);
    if (!holder) continue;
    const control = holder.matches(FOCUSABLE) ? holder : holder.querySelector<HTMLElement>(FOCUSABLE);
    holder.scrollIntoView({ block: 'center', behavior: 'smooth' });
    (control ?? holder).focus({ preventScroll: true });
    return true;
  }
  return false;
}
