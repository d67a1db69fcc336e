import { useId } from 'react';
import { SearchIcon } from '@/components/ui/icons';
import type { ProjectListFilters } from '@/features/projects/api/query-keys';

const statuses: { value: ProjectListFilters['status']; label: string }[] = [
  { value: 'active', label: 'Active' },
  { value: 'archived', label: 'Archived' },
  { value: 'all', label: 'All' },
];

interface ProjectListControlsProps {
  text: string;
  onTextChange: (text: string) => void;
  status: ProjectListFilters['status'];
  onStatusChange: (status: ProjectListFilters['status']) => void;
}

export function ProjectListControls({ text, onTextChange, status, onStatusChange }: ProjectListControlsProps) {
  const searchId = useId();
  return (
    <div className="mb-5 flex flex-wrap items-end justify-between gap-4">
      <div className="flex w-full max-w-sm flex-col gap-1.5">
        <label htmlFor={searchId} className="text-sm font-bold">
          Filter projects
        </label>
        <div className="relative">
          <SearchIcon className="pointer-events-none absolute top-1/2 left-3 size-4 -translate-y-1/2 text-ink-faint" />
          <input
            id={searchId}
            type="search"
            value={text}
            maxLength={120}
            onChange={(event) => onTextChange(event.target.value)}
            placeholder="Name or description"
            className="h-10 w-full rounded-xl bg-card pr-3 pl-9 ring-1 ring-line-strong ring-inset placeholder:text-ink-faint focus:ring-2 focus:ring-teal focus:outline-none"
          />
        </div>
      </div>
      <fieldset className="flex flex-col gap-1.5">
        <legend className="mb-1.5 text-sm font-bold">Show</legend>
        <div className="inline-flex rounded-full bg-paper-deep p-1 ring-1 ring-line ring-inset">
          {statuses.map((option) => (
            <label
              key={option.value}
              className={`cursor-pointer rounded-full px-4 py-1.5 text-sm font-bold transition-colors has-focus-visible:outline-3 has-focus-visible:outline-teal ${
                status === option.value ? 'bg-ink text-card shadow' : 'text-ink-soft hover:text-ink'
              }`}
            >
              <input
                type="radio"
                name="project-status"
                value={option.value}
                checked={status === option.value}
                onChange={() => onStatusChange(option.value)}
                className="sr-only"
              />
              {option.label}
            </label>
          ))}
        </div>
      </fieldset>
    </div>
  );
}
