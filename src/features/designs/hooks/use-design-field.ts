import { useCallback } from 'react';
import type { FieldErrors } from '@/lib/api-client';
import { useDesignEditor } from '@/features/designs/stores/design-editor-store';
import { getIn, pathKey, type FieldPath } from '@/features/designs/utils/design-draft';

function problemAt(errors: FieldErrors, key: string, withChildren: boolean): string | undefined {
  if (errors[key] !== undefined || !withChildren) return errors[key];
  const child = Object.keys(errors).find((path) => path.startsWith(`${key}.`));
  return child === undefined ? undefined : errors[child];
}

/**
 * One field of the draft: its value, the problem to show at it (server first, then schema), and a setter.
 * `withChildren` also shows problems of nested keys, for a control that edits a whole object (a picture reference).
 */
export function useDesignField<T = unknown>(path: FieldPath, { withChildren = false } = {}) {
  const key = pathKey(path);
  const value = useDesignEditor((state) => getIn(state.draft, path)) as T;
  const error = useDesignEditor(
    (state) => problemAt(state.serverErrors, key, withChildren) ?? problemAt(state.check.issues, key, withChildren),
  );
  const setField = useDesignEditor((state) => state.setField);
  const set = useCallback((next: T | undefined) => setField(path, next), [setField, key]);
  return { key, value, error, set };
}
