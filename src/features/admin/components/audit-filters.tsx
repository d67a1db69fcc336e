import { useId, type ReactNode } from 'react';
import { AUDIT_KINDS, type AuditKind } from '@shared/schemas/audit';
import type { User } from '@shared/schemas/auth';
import { plainSelectClasses } from '@/components/ui/field';
import type { AuditFilters } from '@/features/admin/api/query-keys';
import { AUDIT_KIND_INFO } from '@/features/admin/components/audit-kinds';

function FilterSelect({ label, value, onChange, children }: { label: string; value: string; onChange: (value: string) => void; children: ReactNode }) {
  const id = useId();
  return (
    <div className="flex flex-col gap-1.5">
      <label htmlFor={id} className="text-sm font-bold">
        {label}
      </label>
      <select id={id} value={value} onChange={(event) => onChange(event.target.value)} className={`${plainSelectClasses} h-10 max-w-xs`}>
        {children}
      </select>
    </div>
  );
}

interface AuditFilterControlsProps {
  filters: AuditFilters;
  people: User[];
  onChange: (next: Partial<AuditFilters>) => void;
}

export function AuditFilterControls({ filters, people, onChange }: AuditFilterControlsProps) {
  const sorted = [...people].sort((a, b) => a.name.localeCompare(b.name) || a.id - b.id);
  return (
    <div className="mb-5 flex flex-wrap items-end gap-4">
      <FilterSelect label="Person" value={String(filters.userId ?? '')} onChange={(value) => onChange({ userId: value ? Number(value) : null, page: 1 })}>
        <option value="">Everyone</option>
        {sorted.map((person) => (
          <option key={person.id} value={person.id}>
            {person.name} · {person.email}
          </option>
        ))}
      </FilterSelect>
      <FilterSelect label="Event" value={filters.kind ?? ''} onChange={(value) => onChange({ kind: (value || null) as AuditKind | null, page: 1 })}>
        <option value="">Every kind</option>
        {AUDIT_KINDS.map((kind) => (
          <option key={kind} value={kind}>
            {AUDIT_KIND_INFO[kind].label}
          </option>
        ))}
      </FilterSelect>
      <p className="pb-2.5 text-xs text-ink-soft">A person matches the events they caused and the ones done to their account.</p>
    </div>
  );
}
