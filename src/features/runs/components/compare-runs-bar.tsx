import { Link } from 'react-router-dom';
import { Button, buttonClasses } from '@/components/ui/button';
import { paths } from '@/config/paths';

/** Above the runs table: how to compare, and the link once two runs are ticked (older one as run a). */
export function CompareRunsBar({ projectId, selected, onClear }: { projectId: number; selected: number[]; onClear: () => void }) {
  const [a, b] = [...selected].sort((x, y) => x - y);
  return (
    <div className="mb-3 flex min-h-10 flex-wrap items-center gap-3 text-sm" aria-live="polite">
      {selected.length === 2 ? (
        <>
          <Link to={paths.projects.compareRuns.getHref(projectId, a, b)} className={buttonClasses('primary', 'sm')}>
            Compare run {a} with run {b}
          </Link>
          <Button variant="secondary" size="sm" onClick={onClear}>
            Clear the ticks
          </Button>
        </>
      ) : (
        <span className="text-ink-soft">
          {selected.length === 1 ? `Run ${selected[0]} ticked: tick one more to compare the two.` : 'Tick two runs to compare their far fields, metrics and designs side by side.'}
        </span>
      )}
    </div>
  );
}
