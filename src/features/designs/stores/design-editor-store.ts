import { create } from 'zustand';
import { designSchema, type Design } from '@shared/schemas/design';
import { followLabel } from '@/features/designs/utils/channel-labels';
import type { FieldErrors } from '@/lib/api-client';
import {
  newTerm,
  pathKey,
  setIn,
  type ChannelId,
  type DesignDraft,
  type DraftTerm,
  type FieldPath,
  type TermKind,
} from '@/features/designs/utils/design-draft';

export interface DraftCheck {
  /** The parsed design when every field is valid, else null. */
  design: Design | null;
  /** First problem per dotted field path ('' for the design as a whole). */
  issues: FieldErrors;
}

export function checkDraft(draft: DesignDraft): DraftCheck {
  const parsed = designSchema.safeParse(draft);
  if (parsed.success) return { design: parsed.data, issues: {} };
  const issues: FieldErrors = {};
  for (const issue of parsed.error.issues) issues[pathKey(issue.path as (string | number)[])] ??= issue.message;
  return { design: null, issues };
}

export function designSourceKey(userId: number, projectId: number, revision: number | null) {
  return `${userId}:${projectId}:${revision ?? 'template'}`;
}

export function parseSourceKey(key: string) {
  const [userId, projectId, revision] = key.split(':');
  return { userId: Number(userId), projectId: Number(projectId), revision: revision === 'template' ? null : Number(revision) };
}

let nextTermId = 1;
const termIds = (terms: readonly DraftTerm[]) => terms.map(() => `term-${nextTermId++}`);

interface DesignEditorState {
  /** Who edits which saved design: `designSourceKey(userId, projectId, revision)`. */
  sourceKey: string | null;
  baseRevision: number | null;
  draft: DesignDraft | null;
  check: DraftCheck;
  /** Stable React keys of each channel's terms, parallel to the term arrays. */
  termIds: Record<ChannelId, string[]>;
  dirty: boolean;
  /** Problems the server reported on the last save, by dotted design path. */
  serverErrors: FieldErrors;
  load: (sourceKey: string, draft: DesignDraft, baseRevision: number | null) => void;
  setField: (path: FieldPath, value: unknown) => void;
  addTerm: (channel: ChannelId, kind: TermKind) => void;
  moveTerm: (channel: ChannelId, index: number, offset: -1 | 1) => void;
  removeTerm: (channel: ChannelId, index: number) => void;
  setServerErrors: (errors: FieldErrors) => void;
}

const emptyCheck: DraftCheck = { design: null, issues: {} };

function withoutPrefix(errors: FieldErrors, prefix: string): FieldErrors {
  const kept: FieldErrors = {};
  for (const [key, message] of Object.entries(errors)) {
    if (key !== prefix && !key.startsWith(`${prefix}.`)) kept[key] = message;
  }
  return kept;
}

/** `next` with the channel's automatic label following its new terms (channel-labels.ts). */
function withFollowedLabel(previous: DesignDraft, next: DesignDraft, channel: ChannelId): DesignDraft {
  const before = previous.channels[channel];
  const after = next.channels[channel];
  if (!before || !after || before.terms === after.terms) return next;
  const label = followLabel(before, after.terms);
  return label === after.label ? next : setIn(next, ['channels', channel, 'label'], label);
}

function channelPrefix(channel: ChannelId) {
  return `channels.${channel}.terms`;
}

export const useDesignEditor = create<DesignEditorState>()((set) => ({
  sourceKey: null,
  baseRevision: null,
  draft: null,
  check: emptyCheck,
  termIds: { a: [], b: [] },
  dirty: false,
  serverErrors: {},

  load: (sourceKey, draft, baseRevision) =>
    set({
      sourceKey,
      baseRevision,
      draft,
      check: checkDraft(draft),
      termIds: { a: termIds(draft.channels.a.terms), b: termIds(draft.channels.b.terms) },
      dirty: false,
      serverErrors: {},
    }),

  setField: (path, value) =>
    set((state) => {
      if (!state.draft) return state;
      let draft = setIn(state.draft, path, value);
      if (path[0] === 'channels' && path[2] === 'terms' && (path[1] === 'a' || path[1] === 'b')) draft = withFollowedLabel(state.draft, draft, path[1]);
      return { draft, check: checkDraft(draft), dirty: true, serverErrors: withoutPrefix(state.serverErrors, pathKey(path)) };
    }),

  addTerm: (channel, kind) =>
    set((state) => {
      if (!state.draft) return state;
      const terms = [...state.draft.channels[channel].terms, newTerm(kind, channel)];
      const draft = withFollowedLabel(state.draft, setIn(state.draft, ['channels', channel, 'terms'], terms), channel);
      return {
        draft,
        check: checkDraft(draft),
        termIds: { ...state.termIds, [channel]: [...state.termIds[channel], ...termIds([terms[terms.length - 1]])] },
        dirty: true,
        serverErrors: withoutPrefix(state.serverErrors, channelPrefix(channel)),
      };
    }),

  moveTerm: (channel, index, offset) =>
    set((state) => {
      if (!state.draft) return state;
      const target = index + offset;
      const terms = [...state.draft.channels[channel].terms];
      if (target < 0 || target >= terms.length) return state;
      const ids = [...state.termIds[channel]];
      [terms[index], terms[target]] = [terms[target], terms[index]];
      [ids[index], ids[target]] = [ids[target], ids[index]];
      const draft = withFollowedLabel(state.draft, setIn(state.draft, ['channels', channel, 'terms'], terms), channel);
      return {
        draft,
        check: checkDraft(draft),
        termIds: { ...state.termIds, [channel]: ids },
        dirty: true,
        serverErrors: withoutPrefix(state.serverErrors, channelPrefix(channel)),
      };
    }),

  removeTerm: (channel, index) =>
    set((state) => {
      if (!state.draft) return state;
      const terms = state.draft.channels[channel].terms.filter((_, i) => i !== index);
      const draft = withFollowedLabel(state.draft, setIn(state.draft, ['channels', channel, 'terms'], terms), channel);
      return {
        draft,
        check: checkDraft(draft),
        termIds: { ...state.termIds, [channel]: state.termIds[channel].filter((_, i) => i !== index) },
        dirty: true,
        serverErrors: withoutPrefix(state.serverErrors, channelPrefix(channel)),
      };
    }),

  setServerErrors: (errors) => {
    const byDesignPath: FieldErrors = {};
    for (const [key, message] of Object.entries(errors)) {
      byDesignPath[key === 'design' ? '' : key.startsWith('design.') ? key.slice('design.'.length) : key] = message;
    }
    set({ serverErrors: byDesignPath });
  },
}));
