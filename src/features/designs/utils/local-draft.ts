/**
 * Unsaved edits of the composer kept in the browser's storage, one per design source (user, project, revision or
 * new design), so that a reload or a closed tab does not lose them. Restored when the same design is opened
 * again, removed when it is saved or discarded. Alias-free so unit tests can run it against a real Storage.
 */

const PREFIX = 'phasewright:draft:';

export interface LocalDraft<T> {
  draft: T;
  /** ISO time of the last edit kept. */
  savedAt: string;
}

/** The storage key of a design source. Example: '3:12:template' → 'phasewright:draft:3:12:template'. */
export function localDraftKey(sourceKey: string): string {
  return `${PREFIX}${sourceKey}`;
}

/** Keeps the draft; a full or refused storage is ignored (the draft still lives in the page). */
export function keepLocalDraft<T>(storage: Storage, sourceKey: string, draft: T, now = new Date()): void {
  try {
    storage.setItem(localDraftKey(sourceKey), JSON.stringify({ draft, savedAt: now.toISOString() }));
  } catch {
    // Quota exceeded or storage disabled: nothing to keep.
  }
}

/** The kept draft of a design source, or null when there is none or it is not a design draft. */
export function readLocalDraft<T>(storage: Storage, sourceKey: string): LocalDraft<T> | null {
  let text: string | null;
  try {
    text = storage.getItem(localDraftKey(sourceKey));
  } catch {
    return null;
  }
  if (!text) return null;
  try {
    const parsed = JSON.parse(text) as { draft?: { channels?: { a?: { terms?: unknown }; b?: { terms?: unknown } } }; savedAt?: unknown };
    const channels = parsed.draft?.channels;
    if (!channels || !Array.isArray(channels.a?.terms) || !Array.isArray(channels.b?.terms) || typeof parsed.savedAt !== 'string') return null;
    return { draft: parsed.draft as T, savedAt: parsed.savedAt };
  } catch {
    return null;
  }
}

export function discardLocalDraft(storage: Storage, sourceKey: string): void {
  try {
    storage.removeItem(localDraftKey(sourceKey));
  } catch {
    // Storage disabled: nothing was kept.
  }
}
