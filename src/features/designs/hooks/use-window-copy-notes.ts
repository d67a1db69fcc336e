import type { FarFieldWindow } from '@shared/schemas/design';
import { useUploads } from '@/features/designs/api/get-uploads';
import { parseSourceKey, useDesignEditor } from '@/features/designs/stores/design-editor-store';
import { DEMO_IMAGES } from '@/features/designs/utils/demo-images';
import { placeFarFieldWindow } from '@/features/designs/utils/far-field';
import { copiesSentence } from '@/features/designs/utils/window-copies';

/**
 * For P ≥ λ/2: one sentence per far-field window of the draft saying whether its copies, λ/P away, propagate.
 * Example: ['Channel A’s window: its copies are evanescent (the nearest at u = −1.25…−1.02): no effect here.'].
 */
export function useWindowCopyNotes(): string[] {
  const draft = useDesignEditor((state) => state.draft);
  const sourceKey = useDesignEditor((state) => state.sourceKey);
  const uploads = useUploads(sourceKey ? parseSourceKey(sourceKey).projectId : 0);
  if (!draft?.setup) return [];
  const { setup } = draft;
  const step = setup.wavelengthNm / setup.periodNm;
  const notes: string[] = [];
  for (const c of ['a', 'b'] as const) {
    draft.channels[c].terms.forEach((term, index) => {
      if (term.kind !== 'hologram' || term.fresnelDistanceUm !== undefined || !term.window) return;
      const ref = term.image;
      let aspect = 1;
      if (ref?.source === 'demo') {
        const demo = DEMO_IMAGES.find((entry) => entry.name === ref.name);
        if (demo) aspect = demo.width / demo.height;
      } else if (ref?.source === 'upload') {
        const upload = uploads.data?.find((entry) => entry.id === ref.id);
        if (upload) aspect = upload.width / upload.height;
      }
      const placed = placeFarFieldWindow({ ...term.window, units: term.window.units ?? 'degrees', centerX: term.window.centerX ?? 0, centerY: term.window.centerY ?? 0 } as FarFieldWindow, setup, aspect, term.seenOn);
      if ('error' in placed) return;
      const holograms = draft.channels[c].terms.filter((t) => t.kind === 'hologram').length;
      const name = `Channel ${c.toUpperCase()}’s window${holograms > 1 ? ` (term ${index + 1})` : ''}`;
      notes.push(`${name}: ${copiesSentence(placed, step)}.`);
    });
  }
  return notes;
}
