import type { ReactNode } from 'react';
import { SelectField, TextField } from '@/components/ui/field';
import { MathText } from '@/components/ui/math-text';
import { NumberField } from '@/components/ui/number-field';
import { useDesignField } from '@/features/designs/hooks/use-design-field';
import type { FieldPath } from '@/features/designs/utils/design-draft';
import { friendlyMessage } from '@/features/designs/utils/friendly-message';

/** Hints may hold formulas (`$…$` or TeX notation such as e^{iφ}); KaTeX typesets them. */
const typeset = (hint: ReactNode) => (typeof hint === 'string' ? <MathText text={hint} /> : hint);

interface CommonProps {
  path: FieldPath;
  label: ReactNode;
  hint?: ReactNode;
  className?: string;
}

export function DesignNumber({
  path,
  label,
  hint,
  unit,
  placeholder,
  className = '',
}: CommonProps & { unit?: string; placeholder?: string }) {
  const field = useDesignField<number | undefined>(path);
  return (
    <div data-field={field.key} className={className}>
      <NumberField
        label={label}
        unit={unit}
        hint={typeset(hint)}
        placeholder={placeholder}
        value={typeof field.value === 'number' ? field.value : undefined}
        onValueChange={field.set}
        error={field.error ? friendlyMessage(field.key, field.error) : undefined}
      />
    </div>
  );
}

export function DesignText({ path, label, hint, className = '', maxLength }: CommonProps & { maxLength?: number }) {
  const field = useDesignField<string | undefined>(path);
  return (
    <div data-field={field.key} className={className}>
      <TextField
        label={label}
        hint={typeset(hint)}
        maxLength={maxLength}
        value={field.value ?? ''}
        onValueChange={field.set}
        error={field.error ? friendlyMessage(field.key, field.error) : undefined}
      />
    </div>
  );
}

export function DesignSelect<V extends string>({
  path,
  label,
  hint,
  options,
  className = '',
  onSelect,
}: CommonProps & { options: readonly { value: V; label: string }[]; onSelect?: (value: V) => void }) {
  const field = useDesignField<V>(path);
  return (
    <div data-field={field.key} className={className}>
      <SelectField
        label={label}
        hint={typeset(hint)}
        value={field.value === undefined ? options[0].value : (String(field.value) as V)}
        options={options}
        onValueChange={(value) => (onSelect ? onSelect(value) : field.set(value))}
        error={field.error ? friendlyMessage(field.key, field.error) : undefined}
      />
    </div>
  );
}

/** A problem that belongs to a group of fields (a term, a channel) rather than one box. */
export function GroupError({ path }: { path: FieldPath }) {
  const field = useDesignField(path);
  if (!field.error) return null;
  return (
    <p className="flex items-start gap-1 text-sm font-semibold text-danger">
      <span aria-hidden="true">▲</span>
      {friendlyMessage(field.key, field.error)}
    </p>
  );
}
