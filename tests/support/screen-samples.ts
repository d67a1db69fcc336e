import type { ScreenView } from '../../shared/optics/target';

/** Every pixel of a flat-screen view with its place as a fraction of the picture's rectangle (0…1 inside it). */
export function screenSamples(view: ScreenView): { fx: number; fy: number; value: number }[] {
  const samples: { fx: number; fy: number; value: number }[] = [];
  for (let row = 0; row < view.height; row++) {
    for (let col = 0; col < view.width; col++) {
      const x = view.shown.x0 + ((col + 0.5) / view.width) * (view.shown.x1 - view.shown.x0);
      const y = view.shown.y0 + ((row + 0.5) / view.height) * (view.shown.y1 - view.shown.y0);
      samples.push({
        fx: (x - view.picture.x0) / (view.picture.x1 - view.picture.x0),
        fy: (y - view.picture.y0) / (view.picture.y1 - view.picture.y0),
        value: view.irradiance[row * view.width + col],
      });
    }
  }
  return samples;
}
