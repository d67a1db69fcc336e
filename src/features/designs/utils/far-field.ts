import type { FarFieldWindow } from '@shared/schemas/design';
import { farFieldWindowOf, screenWindowOf } from '@shared/optics/design-units';
import { placeScreenWindow, placeWindow, screenFootprint, screenRect } from '@shared/optics/target';

const DEG = 180 / Math.PI;

export interface SetupFigures {
  /** Aperture D = N·P, µm. */
  apertureUm: number;
  /** Direction-cosine step of the far-field grid, λ/(N·P). */
  deltaU: number;
  /** The same step as an angle near the zero order, degrees. */
  deltaDeg: number;
  /** Half-width of the far-field grid in direction cosines, λ/(2P). */
  gridHalfWidth: number;
  /** Steepest direction the grid reaches along x or y, degrees (90 when it reaches the horizon). */
  reachDeg: number;
  /** Part of the grid square lies outside the unit circle (evanescent, masked). */
  gridHasEvanescent: boolean;
  /** P ≥ λ/2: the grid stops short of the horizon and copies of the pattern, λ/P apart, propagate. */
  periodAtLeastHalfWave: boolean;
}

/** Sampling figures of a setup (λ, P in nm). Example: 633 nm, 450 nm, 512 → D = 230.4 µm, Δu = 0.002747. */
export function setupFigures(wavelengthNm: number, periodNm: number, cells: number): SetupFigures | null {
  if (!(wavelengthNm > 0 && periodNm > 0 && cells > 0)) return null;
  const apertureUm = (cells * periodNm) / 1000;
  const deltaU = wavelengthNm / (cells * periodNm);
  const gridHalfWidth = wavelengthNm / (2 * periodNm);
  return {
    apertureUm,
    deltaU,
    deltaDeg: Math.asin(Math.min(1, deltaU)) * DEG,
    gridHalfWidth,
    reachDeg: gridHalfWidth >= 1 ? 90 : Math.asin(gridHalfWidth) * DEG,
    gridHasEvanescent: gridHalfWidth * Math.SQRT2 > 1,
    periodAtLeastHalfWave: periodNm >= wavelengthNm / 2,
  };
}

export interface WindowPlacement {
  /** Rectangle in direction cosines (u = sin θx, v = sin θy), centre and full size. */
  centerU: number;
  centerV: number;
  width: number;
  height: number;
  /** The engine's own check of the window on the N×N grid; null when it fits. */
  problem: string | null;
}

/**
 * Where a hologram window lands in the far field, in direction cosines, with the same conversion and fit
 * check as a run (design-units.ts, target.ts). `aspect` = picture width / height, used when no height is given.
 * A picture seen on a flat screen covers the box of the directions that land on its screen rectangle.
 */
export function placeFarFieldWindow(
  window: FarFieldWindow,
  setup: { wavelengthNm: number; periodNm: number; cells: number },
  aspect: number,
  seenOn: 'far-field' | 'flat-screen' = 'far-field',
): WindowPlacement | { error: string } {
  const deltaU = setup.wavelengthNm / (setup.cells * setup.periodNm);
  const grid = { n: setup.cells, period: setup.periodNm * 1e-9, lambda: setup.wavelengthNm * 1e-9 };
  if (seenOn === 'flat-screen') {
    let rect;
    try {
      rect = screenRect(screenWindowOf(window, 'fourier', 'term'), aspect);
    } catch (error) {
      return { error: (error as Error).message.replace(/^term(\.\w+)*: /, '') };
    }
    const box = screenFootprint(rect);
    let problem: string | null = null;
    try {
      placeScreenWindow(grid, rect);
    } catch (error) {
      problem = (error as Error).message;
    }
    return { centerU: (box.uMin + box.uMax) / 2, centerV: (box.vMin + box.vMax) / 2, width: box.uMax - box.uMin, height: box.vMax - box.vMin, problem };
  }
  let spec;
  try {
    spec = farFieldWindowOf(window, 'fourier', 'window');
  } catch (error) {
    return { error: (error as Error).message.replace(/^window(\.\w+)?: /, '') };
  }
  const perUnit = spec.units === 'cells' ? deltaU : 1;
  const width = spec.width * perUnit;
  const height = (spec.height ?? spec.width / aspect) * perUnit;
  let problem: string | null = null;
  try {
    placeWindow(grid, spec, aspect, 'fourier');
  } catch (error) {
    problem = (error as Error).message;
  }
  return { centerU: spec.centerX * perUnit, centerV: spec.centerY * perUnit, width, height, problem };
}
