/**
 * From a validated design file (shared/schemas/design.ts: wavelength and period in nm, other lengths in µm,
 * angles in degrees) to the engine's units (metres, radians) and types.
 *
 * Far-field windows given in degrees are converted to direction cosines (u = sinθx, v = sinθy, the same
 * convention as the tilt term φ = k(x sinθx + y sinθy)): centre u_c = sinθc, width
 * sin(θc + w/2) − sin(θc − w/2) (the angular window seen from the zero order maps to this extent of the
 * far-field grid, whose step is Δu = λ/(N·P)). 'cells' and 'direction-cosine' pass through to target.ts.
 *
 * Pure: no Node API, no I/O. A value the schema accepts but the physics cannot use throws
 * `DesignUnitsError`, which names the design field (dotted path) like a schema issue.
 */
import type { Design, FarFieldWindow, PhaseTermSpec, PolarizationState } from '../schemas/design';
import type { DesignRules } from './drc';
import type { Illumination } from './illumination';
import type { PhaseTerm } from './phase-terms';
import { circularState, ellipticalState, linearState, polarizationPair, type PolarizationPair, type PolarizationSpec } from './polarization';
import type { ScreenWindowSpec, TargetGeometry, TargetWindowSpec } from './target';
import type { CellGrid, JonesVector } from './types';

const DEG = Math.PI / 180;

/** A design value that the engine cannot use; `path` is the dotted design field, e.g. 'channels.a.terms.0.window.width'. */
export class DesignUnitsError extends RangeError {
  readonly path: string;
  constructor(path: string, message: string) {
    super(`${path}: ${message}`);
    this.name = 'DesignUnitsError';
    this.path = path;
  }
}

/**
 * Cell grid in metres. Example: { wavelengthNm: 633, periodNm: 450, cells: 1024 } → { n: 1024, period: 4.5e-7, lambda: 6.33e-7 }.
 */
export function cellGridOf(design: Design): CellGrid {
  return { n: design.setup.cells, period: design.setup.periodNm * 1e-9, lambda: design.setup.wavelengthNm * 1e-9 };
}

/** Illumination in metres. Example: { kind: 'gaussian', waistUm: 150 } → { kind: 'gaussian', waist: 1.5e-4 }. */
export function illuminationOf(design: Design): Illumination {
  const illumination = design.setup.illumination;
  return illumination.kind === 'gaussian' ? { kind: 'gaussian', waist: illumination.waistUm * 1e-6 } : { kind: 'flat' };
}

/** Polarization description in radians. Example: { kind: 'linear', angleDeg: 90 } → { kind: 'linear', angle: π/2 }. */
export function polarizationSpecOf(state: PolarizationState): PolarizationSpec {
  switch (state.kind) {
    case 'linear':
      return { kind: 'linear', angle: state.angleDeg * DEG };
    case 'circular':
      return { kind: 'circular', handedness: state.handedness };
    case 'elliptical':
      return { kind: 'elliptical', psi: state.psiDeg * DEG, chi: state.chiDeg * DEG };
  }
}

/** The design's orthogonal pair (A = the described state, B its partner; polarization.ts conventions). */
export function polarizationPairOf(design: Design): PolarizationPair {
  return polarizationPair(polarizationSpecOf(design.polarization));
}

/**
 * Jones vector of a single state (e.g. the extra preview input), unit norm, polarization.ts conventions.
 * Example: { kind: 'linear', angleDeg: 45 } → [[0.70711, 0], [0.70711, 0]].
 */
export function jonesVectorOf(state: PolarizationState): JonesVector {
  switch (state.kind) {
    case 'linear':
      return linearState(state.angleDeg * DEG);
    case 'circular':
      return circularState(state.handedness);
    case 'elliptical':
      return ellipticalState(state.psiDeg * DEG, state.chiDeg * DEG);
  }
}

/** Direction-cosine extent of the angular interval [θc − w/2, θc + w/2] (degrees in, plain number out). */
function angularExtent(centreDeg: number, widthDeg: number, path: string): number {
  const low = centreDeg - widthDeg / 2;
  const high = centreDeg + widthDeg / 2;
  if (!(low > -90 && high < 90)) {
    throw new DesignUnitsError(path, `the window spans ${low.toFixed(2)}°…${high.toFixed(2)}°, which leaves the range −90°…90°`);
  }
  return Math.sin(high * DEG) - Math.sin(low * DEG);
}

/**
 * Window of an image hologram in target.ts form. Degrees → direction cosines (module comment); 'cells' and
 * 'direction-cosine' pass through. `path` names the window in the design for error messages.
 * In the Fresnel geometry only 'cells' applies. An omitted height stays omitted: target.ts then keeps the
 * picture's aspect ratio in direction cosines.
 * Example: { units: 'degrees', width: 10, centerX: 15, centerY: 0 } → width sin 20° − sin 10° = 0.16837, centerX sin 15° = 0.25882.
 */
export function farFieldWindowOf(window: FarFieldWindow, geometry: TargetGeometry = 'fourier', path = 'window'): TargetWindowSpec {
  if (geometry === 'fresnel' && window.units !== 'cells') {
    throw new DesignUnitsError(`${path}.units`, `a hologram at a finite distance (fresnelDistanceUm) needs the window in 'cells', got '${window.units}'`);
  }
  if (window.units !== 'degrees') {
    const spec: TargetWindowSpec = { units: window.units, width: window.width, centerX: window.centerX, centerY: window.centerY };
    if (window.height !== undefined) spec.height = window.height;
    return spec;
  }
  for (const [key, value] of [
    ['centerX', window.centerX],
    ['centerY', window.centerY],
  ] as const) {
    if (!(Math.abs(value) < 90)) throw new DesignUnitsError(`${path}.${key}`, `must lie in (−90°, 90°), got ${value}`);
  }
  const spec: TargetWindowSpec = {
    units: 'direction-cosine',
    width: angularExtent(window.centerX, window.width, `${path}.width`),
    centerX: Math.sin(window.centerX * DEG),
    centerY: Math.sin(window.centerY * DEG),
  };
  if (window.height !== undefined) spec.height = angularExtent(window.centerY, window.height, `${path}.height`);
  return spec;
}

/**
 * Window of a hologram seen on a flat screen (target.ts `buildScreenTarget`): degrees → radians. Needs the
 * window in degrees and the far-field geometry; each edge must stay within ±90°.
 * Example: { units: 'degrees', width: 20, centerX: 10, centerY: 0 } → width 0.34907, centerX 0.17453 (radians).
 */
export function screenWindowOf(window: FarFieldWindow, geometry: TargetGeometry, path: string): ScreenWindowSpec {
  if (geometry === 'fresnel') throw new DesignUnitsError(`${path}.seenOn`, "a hologram at a finite distance (fresnelDistanceUm) is not seen on a flat screen far away; use seenOn 'far-field'");
  if (window.units !== 'degrees') throw new DesignUnitsError(`${path}.window.units`, `a picture seen on a flat screen needs the window in 'degrees', got '${window.units}'`);
  const spec: ScreenWindowSpec = { centerX: window.centerX * DEG, centerY: window.centerY * DEG, width: window.width * DEG };
  if (window.height !== undefined) spec.height = window.height * DEG;
  for (const [key, centre, size] of [
    ['width', window.centerX, window.width],
    ['height', window.centerY, window.height ?? 0],
  ] as const) {
    const low = centre - size / 2;
    const high = centre + size / 2;
    if (!(low > -90 && high < 90)) throw new DesignUnitsError(`${path}.window.${key}`, `the window spans ${low.toFixed(2)}°…${high.toFixed(2)}°, which leaves the range −90°…90°`);
  }
  return spec;
}

/**
 * Analytic phase term in engine units (µm → m, degrees → rad). Holograms are not analytic (null); a custom
 * term needs its phase map (radians, N×N), resolved by the caller.
 * Example: { kind: 'lens', focalLengthUm: 500 } → { kind: 'lens', focalLength: 5e-4 }.
 */
export function analyticTermOf(term: PhaseTermSpec, customPhase?: ArrayLike<number>): PhaseTerm | null {
  switch (term.kind) {
    case 'hologram':
      return null;
    case 'axicon':
      return term.coneHalfAngleDeg !== undefined
        ? { kind: 'axicon', coneHalfAngle: term.coneHalfAngleDeg * DEG }
        : { kind: 'axicon', numericalAperture: term.numericalAperture };
    case 'vortex':
      return { kind: 'vortex', charge: term.charge };
    case 'lens':
      return { kind: 'lens', focalLength: term.focalLengthUm * 1e-6 };
    case 'tilt':
      return { kind: 'tilt', thetaX: term.thetaXDeg * DEG, thetaY: term.thetaYDeg * DEG };
    case 'custom':
      if (!customPhase) throw new RangeError('A custom phase term needs its phase map');
      return { kind: 'custom', phase: customPhase };
  }
}

/** Design rules in metres. Example: { minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 } → { minGap: 5e-8, minFeature: 1e-7, maxAspectRatio: 10 }. */
export function designRulesOf(design: Design): DesignRules {
  const rules = design.designRules;
  return { minGap: rules.minGapNm * 1e-9, minFeature: rules.minFeatureNm * 1e-9, maxAspectRatio: rules.maxAspectRatio };
}

/** Planes of a beam channel's x–z slice in metres, if the design gives them (µm in the file). */
export function beamPlanesOf(design: Design): { start: number; end: number; steps: number } | null {
  const z = design.simulation.beamZUm;
  return z ? { start: z.start * 1e-6, end: z.end * 1e-6, steps: z.steps } : null;
}
