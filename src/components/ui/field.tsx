import {
  useId,
  type InputHTMLAttributes,
  type ReactNode,
  type SelectHTMLAttributes,
  type TextareaHTMLAttributes,
} from 'react';

const controlBase =
  'w-full rounded-xl bg-card px-3.5 text-ink ring-1 ring-inset ring-line-strong placeholder:text-ink-faint transition-shadow focus:outline-none focus-visible:outline-none focus:ring-2 focus:ring-teal disabled:bg-paper-deep disabled:text-ink-soft aria-invalid:ring-2 aria-invalid:ring-danger';

interface FieldShellProps {
  label: ReactNode;
  hint?: ReactNode;
  error?: string;
  className?: string;
  children: (ids: { controlId: string; describedBy: string | undefined; invalid: boolean }) => ReactNode;
}

/** A label, a control made by `children` with the ids to wire, a hint and an error: the frame of every field. */
export function FieldShell({ label, hint, error, className = '', children }: FieldShellProps) {
  const controlId = useId();
  const hintId = `${controlId}-hint`;
  const errorId = `${controlId}-error`;
  const describedBy = [hint ? hintId : null, error ? errorId : null].filter(Boolean).join(' ') || undefined;
  return (
    <div className={`flex flex-col gap-1.5 ${className}`}>
      <label htmlFor={controlId} className="text-sm font-bold text-ink">
        {label}
      </label>
      {children({ controlId, describedBy, invalid: Boolean(error) })}
      {hint ? (
        <p id={hintId} className="text-xs text-ink-soft">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={errorId} className="flex items-start gap-1 text-sm font-semibold text-danger">
          <span aria-hidden="true">▲</span>
          {error}
        </p>
      ) : null}
    </div>
  );
}

interface TextFieldProps extends Omit<InputHTMLAttributes<HTMLInputElement>, 'onChange' | 'value'> {
  label: ReactNode;
  value: string;
  onValueChange: (value: string) => void;
  hint?: ReactNode;
  error?: string;
  wrapperClassName?: string;
}

export function TextField({ label, hint, error, value, onValueChange, wrapperClassName, className = '', ...rest }: TextFieldProps) {
  return (
    <FieldShell label={label} hint={hint} error={error} className={wrapperClassName}>
      {({ controlId, describedBy, invalid }) => (
        <input
          id={controlId}
          value={value}
          onChange={(event) => onValueChange(event.target.value)}
          aria-invalid={invalid || undefined}
          aria-describedby={describedBy}
          className={`${controlBase} h-10 ${className}`}
          {...rest}
        />
      )}
    </FieldShell>
  );
}

interface TextAreaFieldProps extends Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, 'onChange' | 'value'> {
  label: ReactNode;
  value: string;
  onValueChange: (value: string) => void;
  hint?: ReactNode;
  error?: string;
  wrapperClassName?: string;
}

export function TextAreaField({ label, hint, error, value, onValueChange, wrapperClassName, className = '', ...rest }: TextAreaFieldProps) {
  return (
    <FieldShell label={label} hint={hint} error={error} className={wrapperClassName}>
      {({ controlId, describedBy, invalid }) => (
        <textarea
          id={controlId}
          value={value}
          onChange={(event) => onValueChange(event.target.value)}
          aria-invalid={invalid || undefined}
          aria-describedby={describedBy}
          className={`${controlBase} min-h-24 py-2.5 ${className}`}
          {...rest}
        />
      )}
    </FieldShell>
  );
}

interface SelectFieldProps<V extends string> extends Omit<SelectHTMLAttributes<HTMLSelectElement>, 'onChange' | 'value'> {
  label: ReactNode;
  value: V;
  onValueChange: (value: V) => void;
  options: readonly { value: V; label: string }[];
  hint?: ReactNode;
  error?: string;
  wrapperClassName?: string;
}

export function SelectField<V extends string>({
  label,
  hint,
  error,
  value,
  onValueChange,
  options,
  wrapperClassName,
  className = '',
  ...rest
}: SelectFieldProps<V>) {
  return (
    <FieldShell label={label} hint={hint} error={error} className={wrapperClassName}>
      {({ controlId, describedBy, invalid }) => (
        <select
          id={controlId}
          value={value}
          onChange={(event) => onValueChange(event.target.value as V)}
          aria-invalid={invalid || undefined}
          aria-describedby={describedBy}
          className={`${controlBase} h-10 pr-8 ${className}`}
          {...rest}
        >
          {options.map((option) => (
            <option key={option.value} value={option.value}>
              {option.label}
            </option>
          ))}
        </select>
      )}
    </FieldShell>
  );
}

export const plainSelectClasses = `${controlBase} h-9 w-auto pr-8 text-sm`;
