import { useId, useState, type InputHTMLAttributes, type ReactNode } from 'react';

const controlBase =
  'w-full rounded-xl bg-card pl-3.5 text-ink ring-1 ring-inset ring-line-strong tabular-nums placeholder:text-ink-faint transition-shadow focus:outline-none focus-visible:outline-none focus:ring-2 focus:ring-teal disabled:bg-paper-deep disabled:text-ink-soft aria-invalid:ring-2 aria-invalid:ring-danger';

function parseNumber(text: string): number | undefined {
  const trimmed = text.trim().replace(/^−/, '-').replace(',', '.');
  if (trimmed === '') return undefined;
  return Number(trimmed);
}

function sameNumber(a: number | undefined, b: number | undefined) {
  return a === b || (Number.isNaN(a) && Number.isNaN(b));
}

interface NumberFieldProps extends Omit<InputHTMLAttributes<HTMLInputElement>, 'onChange' | 'value' | 'type'> {
  label: ReactNode;
  /** Shown after the number and read out with the label; '' or omitted for plain numbers. */
  unit?: string;
  value: number | undefined;
  /** Receives undefined for an empty box and NaN for text that is not a number, so validation can say so. */
  onValueChange: (value: number | undefined) => void;
  hint?: ReactNode;
  error?: string;
  wrapperClassName?: string;
}

/** A number box with its unit beside the value; keeps what the user typed until it is a number again. */
export function NumberField({ label, unit, value, onValueChange, hint, error, wrapperClassName = '', className = '', ...rest }: NumberFieldProps) {
  const controlId = useId();
  const hintId = `${controlId}-hint`;
  const errorId = `${controlId}-error`;
  const [text, setText] = useState(() => (value === undefined || Number.isNaN(value) ? '' : String(value)));
  const [shown, setShown] = useState(value);
  if (!sameNumber(shown, value)) {
    setShown(value);
    if (!sameNumber(parseNumber(text), value)) setText(value === undefined || Number.isNaN(value) ? '' : String(value));
  }
  const describedBy = [hint ? hintId : null, error ? errorId : null].filter(Boolean).join(' ') || undefined;
  return (
    <div className={`flex flex-col gap-1.5 ${wrapperClassName}`}>
      <label htmlFor={controlId} className="text-sm font-bold text-ink">
        {label}
        {unit ? <span className="sr-only"> ({unit})</span> : null}
      </label>
      <div className="relative">
        <input
          id={controlId}
          type="text"
          inputMode="decimal"
          autoComplete="off"
          spellCheck={false}
          value={text}
          onChange={(event) => {
            const next = event.target.value;
            const parsed = parseNumber(next);
            setText(next);
            setShown(parsed);
            onValueChange(parsed);
          }}
          aria-invalid={error ? true : undefined}
          aria-describedby={describedBy}
          className={`${controlBase} h-10 ${unit ? 'pr-14' : 'pr-3.5'} ${className}`}
          {...rest}
        />
        {unit ? (
          <span aria-hidden="true" className="pointer-events-none absolute inset-y-0 right-3.5 flex items-center text-sm font-semibold text-ink-soft">
            {unit}
          </span>
        ) : null}
      </div>
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
