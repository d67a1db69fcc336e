import type { AssetRef, Design } from '../../../shared/schemas/design';
import type { UploadKind } from '../../../shared/schemas/uploads';

export interface AssetUse {
  ref: AssetRef;
  /** Dotted path of the reference inside the design, e.g. 'channels.a.terms.0.image'. */
  path: string;
  /** Upload kinds the term can use. */
  accepts: UploadKind[];
}

/** Every picture and phase map a design refers to, in channel and term order. */
export function assetUses(design: Design): AssetUse[] {
  const uses: AssetUse[] = [];
  for (const channel of ['a', 'b'] as const) {
    design.channels[channel].terms.forEach((term, index) => {
      const path = `channels.${channel}.terms.${index}`;
      if (term.kind === 'hologram') uses.push({ ref: term.image, path: `${path}.image`, accepts: ['image'] });
      if (term.kind === 'custom') uses.push({ ref: term.phaseMap, path: `${path}.phaseMap`, accepts: ['phase-map', 'image'] });
    });
  }
  return uses;
}

/** Ids of the uploads a design refers to, each once. */
export function uploadIdsOf(design: Design): number[] {
  return [...new Set(assetUses(design).flatMap((use) => (use.ref.source === 'upload' ? [use.ref.id] : [])))];
}
