import type { FieldErrors } from '@/lib/api-client';
import { describeField } from '@/features/designs/utils/design-fields';
import { focusField } from '@/features/designs/utils/focus-field';
import { friendlyMessage } from '@/features/designs/utils/friendly-message';

/** Every open problem of the draft, each a button that takes the user to its field. */
export function IssueList({ issues, design, title }: { issues: FieldErrors; design: unknown; title: string }) {
  const entries = Object.entries(issues);
  if (entries.length === 0) return null;
  return (
    <section aria-label={title} className="rounded-2xl bg-danger-wash px-4 py-3 text-sm text-danger ring-1 ring-danger/25 ring-inset">
      <h2 className="font-bold">{title}</h2>
      <ul className="mt-1.5 flex flex-col gap-1">
        {entries.map(([path, message]) => {
          const field = describeField(path, design);
          return (
            <li key={path}>
              <button
                type="button"
                className="rounded text-left underline decoration-danger/40 underline-offset-2 hover:decoration-danger"
                onClick={() => focusField(path)}
              >
                <span className="font-bold">{field.label}:</span> {friendlyMessage(path, message)}
              </button>
            </li>
          );
        })}
      </ul>
    </section>
  );
}
