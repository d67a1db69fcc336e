/**
 * The approximate demo library against RCWA: one demo atom recomputed by `computeAtom` with the same pillar, the
 * same materials (Si₃N₄, Luke et al. 2015, on fused silica, Malitson 1965, in air) and λ, P of the library, so
 * that people can see how far the effective-index model is from a full-wave answer (README "Demo library against
 * RCWA", `npx tsx bench/demo-vs-rcwa.ts`).
 */
import type { AtomLibrary, LightSide, MetaAtom } from './atoms';
import { FUSED_SILICA, SILICON_NITRIDE } from './materials';
import { computeAtom, type RcwaCell } from './rcwa';

/** One demo atom beside its RCWA result. Phases in [0, 2π), differences wrapped into (−π, π]. */
export interface DemoAgainstRcwa {
  id: string;
  width: number;
  length: number;
  demo: Pick<MetaAtom, 'tx' | 'ty' | 'alphaX' | 'alphaY'>;
  rcwa: Pick<MetaAtom, 'tx' | 'ty' | 'alphaX' | 'alphaY'>;
  /** RCWA − demo. */
  difference: Pick<MetaAtom, 'tx' | 'ty' | 'alphaX' | 'alphaY'>;
  /** RCWA powers for x and y input: zeroth-order and other-order transmittance, total and zeroth-order reflectance. */
  x: DemoRcwaPowers;
  y: DemoRcwaPowers;
  harmonics: number;
  lightFrom: LightSide;
}

export interface DemoRcwaPowers {
  zeroOrder: number;
  otherOrders: number;
  reflected: number;
  zeroOrderReflected: number;
}

const wrapPi = (a: number): number => a - 2 * Math.PI * Math.round(a / (2 * Math.PI));

/**
 * Recomputes demo atom `atom` of `library` (a demoAtomLibrary) by RCWA at `harmonics` × `harmonics`, light from
 * `lightFrom`. Example: demoAgainstRcwa(lib, lib.atoms[1], 11, 'substrate').difference.alphaX → RCWA − model phase.
 */
export function demoAgainstRcwa(library: AtomLibrary, atom: MetaAtom, harmonics: number, lightFrom: LightSide): DemoAgainstRcwa {
  const cell: RcwaCell = {
    period: library.period,
    superstrate: { kind: 'constant', n: 1, name: 'air' },
    substrate: { kind: 'sellmeier', material: FUSED_SILICA },
    pillar: { shape: 'rect', width: atom.width, length: atom.length, height: library.height, material: { kind: 'sellmeier', material: SILICON_NITRIDE } },
  };
  const r = computeAtom(cell, { lambda: library.lambda, harmonics, illumination: lightFrom });
  const demo = { tx: atom.tx, ty: atom.ty, alphaX: atom.alphaX, alphaY: atom.alphaY };
  const rcwa = { tx: r.tx, ty: r.ty, alphaX: r.alphaX, alphaY: r.alphaY };
  const powers = (p: typeof r.x): DemoRcwaPowers => ({
    zeroOrder: p.zeroOrderTransmitted,
    otherOrders: p.otherOrdersTransmitted,
    reflected: p.reflected,
    zeroOrderReflected: p.zeroOrderReflected,
  });
  return {
    id: atom.id,
    width: atom.width,
    length: atom.length,
    demo,
    rcwa,
    difference: { tx: rcwa.tx - demo.tx, ty: rcwa.ty - demo.ty, alphaX: wrapPi(rcwa.alphaX - demo.alphaX), alphaY: wrapPi(rcwa.alphaY - demo.alphaY) },
    x: powers(r.x),
    y: powers(r.y),
    harmonics,
    lightFrom,
  };
}
