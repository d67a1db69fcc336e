/**
 * Where the demo assets named in design files live, relative to the repository root. The one place that
 * maps a `{ source: 'demo', name }` image reference to its file, for the command line, the server and the
 * browser alike. The pictures are our own, drawn by scripts/make-demo-assets.ts (128×128 grayscale PNG).
 */
import type { AssetRef } from './schemas/design';

export type DemoImageName = Extract<AssetRef, { source: 'demo' }>['name'];

/** Demo picture name → path from the repository root. */
export const DEMO_IMAGE_FILES: Readonly<Record<DemoImageName, string>> = {
  lighthouse: 'demo-assets/images/lighthouse.png',
  'compass-rose': 'demo-assets/images/compass-rose.png',
};

/** Folder of the demo design files, from the repository root. */
export const DEMO_DESIGNS_FOLDER = 'demo-assets/designs';
