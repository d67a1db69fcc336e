import type { DemoImageName } from '@shared/demo-assets';
import compassRoseUrl from '../../../../demo-assets/images/compass-rose.png?url';
import lighthouseUrl from '../../../../demo-assets/images/lighthouse.png?url';

/** Our own demo targets (shared/demo-assets.ts names them; both are 128 × 128 grayscale). */
export const DEMO_IMAGES: readonly { name: DemoImageName; label: string; url: string; width: number; height: number }[] = [
  { name: 'lighthouse', label: 'Lighthouse', url: lighthouseUrl, width: 128, height: 128 },
  { name: 'compass-rose', label: 'Compass rose', url: compassRoseUrl, width: 128, height: 128 },
];
