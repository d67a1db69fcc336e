import { useCallback, useRef, useState, type FormEvent } from 'react';
import type { z } from 'zod';
import { isApiError, type FieldErrors } from '@/lib/api-client';

function issuesToFields(issues: readonly { path: readonly PropertyKey[]; message: string }[]): FieldErrors {
  const errors: FieldErrors = {};
  for (const issue of issues) {
    const key = issue.path.length ? issue.path.map(String).join('.') : 'form';
    errors[key] ??= issue.message;
  }
  return errors;
}

function focusFirstInvalid(form: HTMLFormElement | null) {
  requestAnimationFrame(() => {
    form?.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
  });
}

/**
 * Form state checked against a shared zod schema before sending, with the server's own `details`
 * merged back onto the same fields when the request is refused.
 */
export function useSchemaForm<S extends z.ZodType<unknown, Record<string, unknown>>>(schema: S, initial: z.input<S>) {
  const formRef = useRef<HTMLFormElement>(null);
  const [values, setValues] = useState<z.input<S>>(initial);
  const [errors, setErrors] = useState<FieldErrors>({});
  const [formError, setFormError] = useState<string | null>(null);

  const setValue = useCallback(<K extends keyof z.input<S>>(key: K, value: z.input<S>[K]) => {
    setValues((current) => ({ ...current, [key]: value }));
  }, []);

  const reset = useCallback(
    (next: z.input<S> = initial) => {
      setValues(next);
      setErrors({});
      setFormError(null);
    },
    [initial],
  );

  const handleSubmit =
    (onValid: (data: z.output<S>) => Promise<unknown>, onAttempt?: () => void) =>
    async (event: FormEvent<HTMLFormElement>) => {
      event.preventDefault();
      onAttempt?.();
      const parsed = schema.safeParse(values);
      if (!parsed.success) {
        const fieldErrors = issuesToFields(parsed.error.issues);
        setErrors(fieldErrors);
        setFormError(fieldErrors.form ?? null);
        focusFirstInvalid(formRef.current);
        return;
      }
      setErrors({});
      setFormError(null);
      try {
        await onValid(parsed.data);
      } catch (error) {
        if (isApiError(error)) {
          setErrors(error.details);
          setFormError(error.message);
          focusFirstInvalid(formRef.current);
        } else {
          setFormError('Something unexpected happened — try again');
        }
      }
    };

  const fieldError = (name: keyof z.input<S> & string) => errors[name];

  return { formRef, values, setValue, errors, fieldError, formError, setFormError, handleSubmit, reset };
}
