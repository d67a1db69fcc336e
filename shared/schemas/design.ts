/**
 * The design file: everything needed to turn two targets into a layout and a preview. Shared by the
 * command line and the web app. User-facing units: wavelength and period in nm, other lengths in µm,
 * angles in degrees; the engine works in metres and radians (see `shared/optics/design-units.ts`).
 */
import { z } from 'zod';

/** Where the light enters a cell (the same words as an RCWA library build spec's `illumination`). */
export const LIGHT_SIDES = ['substrate', 'superstrate'] as const;

const finite = (what: string) => z.number({ error: `${what} must be a number` }).refine(Number.isFinite, `${what} must be finite`);
const positive = (what: string) => finite(what).refine((v) => v > 0, `${what} must be greater than 0`);

export const CELL_COUNTS = [64, 128, 256, 512, 1024, 2048, 4096] as const;

export const polarizationStateSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('linear'), angleDeg: finite('angleDeg').default(0) }),
  z.object({ kind: z.literal('circular'), handedness: z.enum(['left', 'right']) }),
  z.object({
    kind: z.literal('elliptical'),
    psiDeg: finite('psiDeg'),
    chiDeg: finite('chiDeg').refine((v) => Math.abs(v) <= 45, 'chiDeg must lie between −45 and 45'),
  }),
]);
export type PolarizationState = z.infer<typeof polarizationStateSchema>;

/** Where an image or phase map comes from: a file next to the design (CLI), an upload (web), or our demo assets. */
export const assetRefSchema = z.discriminatedUnion('source', [
  z.object({ source: z.literal('file'), path: z.string().min(1, 'path must not be empty') }),
  z.object({ source: z.literal('upload'), id: z.number().int().positive() }),
  z.object({ source: z.literal('demo'), name: z.enum(['lighthouse', 'compass-rose']) }),
]);
export type AssetRef = z.infer<typeof assetRefSchema>;

export const farFieldWindowSchema = z.object({
  /** 'degrees': angles from the zero order; 'direction-cosine': sin θ; 'cells': far-field pixels of λ/(N·P). */
  units: z.enum(['degrees', 'direction-cosine', 'cells']).default('degrees'),
  width: positive('window width'),
  /** Omitted: keeps the image's aspect ratio. */
  height: positive('window height').optional(),
  centerX: finite('window centerX').default(0),
  centerY: finite('window centerY').default(0),
});
export type FarFieldWindow = z.infer<typeof farFieldWindowSchema>;

export const hologramTermSchema = z.object({
  kind: z.literal('hologram'),
  image: assetRefSchema,
  window: farFieldWindowSchema,
  /** intensity = (gray/255)^gamma */
  gamma: positive('gamma').default(1),
  algorithm: z.enum(['gs', 'weighted-gs', 'mraf']).default('weighted-gs'),
  iterations: z.number().int().min(1).max(5000).default(100),
  seed: z.number().int().min(0).max(2 ** 32 - 1).default(1),
  /** MRAF mixing parameter m (Pasienski & DeMarco 2008). */
  mixing: finite('mixing').refine((v) => v > 0 && v <= 1, 'mixing must lie in (0, 1]').default(0.5),
  /** Omitted: far field (Fraunhofer). Given: image at this distance, Fresnel geometry. */
  fresnelDistanceUm: positive('fresnelDistanceUm').optional(),
  /**
   * Where the far-field picture is looked at: 'far-field' — laid out evenly in direction cosines, as in the focal
   * plane of a Fourier lens; 'flat-screen' — on a flat screen facing the device, the picture pre-distorted so it
   * looks right there (window in degrees, measured to the picture's edges on the screen).
   */
  seenOn: z.enum(['far-field', 'flat-screen']).default('far-field'),
});

export const phaseTermSchema = z.discriminatedUnion('kind', [
  hologramTermSchema,
  z
    .object({
      kind: z.literal('axicon'),
      coneHalfAngleDeg: finite('coneHalfAngleDeg').refine((v) => v > 0 && v < 90, 'coneHalfAngleDeg must lie in (0, 90)').optional(),
      numericalAperture: finite('numericalAperture').refine((v) => v > 0 && v < 1, 'numericalAperture must lie in (0, 1)').optional(),
    })
    .refine((t) => (t.coneHalfAngleDeg === undefined) !== (t.numericalAperture === undefined), {
      message: 'give exactly one of coneHalfAngleDeg or numericalAperture',
      path: ['coneHalfAngleDeg'],
    }),
  z.object({
    kind: z.literal('vortex'),
    charge: z.number().int('charge must be a whole number').min(-50).max(50).refine((v) => v !== 0, 'charge must not be 0'),
  }),
  z.object({ kind: z.literal('lens'), focalLengthUm: finite('focalLengthUm').refine((v) => v !== 0, 'focalLengthUm must not be 0') }),
  z.object({
    kind: z.literal('tilt'),
    thetaXDeg: finite('thetaXDeg').refine((v) => Math.abs(v) < 90, 'thetaXDeg must lie in (−90, 90)').default(0),
    thetaYDeg: finite('thetaYDeg').refine((v) => Math.abs(v) < 90, 'thetaYDeg must lie in (−90, 90)').default(0),
  }),
  /** A phase map in radians: .npy (N×N float) or grayscale PNG (0…255 → 0…2π). */
  z.object({ kind: z.literal('custom'), phaseMap: assetRefSchema }),
]);
export type PhaseTermSpec = z.infer<typeof phaseTermSchema>;

/** How a phase term is named to a person, e.g. in messages such as "channel A, term 1 (image hologram)". */
export const PHASE_TERM_LABELS: Readonly<Record<PhaseTermSpec['kind'], string>> = {
  hologram: 'image hologram',
  axicon: 'axicon',
  vortex: 'vortex',
  lens: 'lens',
  tilt: 'tilt',
  custom: 'custom phase map',
};

export const channelRecipeSchema = z.object({
  label: z.string().trim().max(80).default(''),
  terms: z.array(phaseTermSchema).min(1, 'a channel needs at least one phase term').max(12),
});
export type ChannelRecipe = z.infer<typeof channelRecipeSchema>;

export const atomLibraryRefSchema = z.discriminatedUnion('source', [
  z.object({ source: z.literal('demo') }),
  z.object({ source: z.literal('file'), path: z.string().min(1) }),
  z.object({ source: z.literal('library'), id: z.number().int().positive() }),
]);

export const designSchema = z
  .object({
    format: z.literal('phasewright-design/1').default('phasewright-design/1'),
    name: z.string().trim().min(1, 'name must not be empty').max(120),
    setup: z.object({
      wavelengthNm: finite('wavelengthNm').refine((v) => v >= 200 && v <= 20000, 'wavelengthNm must lie in 200…20000'),
      periodNm: finite('periodNm').refine((v) => v >= 50 && v <= 20000, 'periodNm must lie in 50…20000'),
      cells: z
        .number()
        .int()
        .refine((v) => (CELL_COUNTS as readonly number[]).includes(v), `cells must be one of ${CELL_COUNTS.join(', ')}`),
      illumination: z
        .discriminatedUnion('kind', [
          z.object({ kind: z.literal('plane') }),
          z.object({ kind: z.literal('gaussian'), waistUm: positive('waistUm') }),
        ])
        .default({ kind: 'plane' }),
      platform: z.string().trim().max(200).default(''),
      /**
       * Where the light enters: 'substrate' (through the substrate, leaving from the pillars' side into the
       * superstrate) or 'superstrate' (onto the pillars, leaving through the substrate). Default 'substrate': the
       * demo library's model assumes it (light arrives through the substrate), and the layout is drawn seen from
       * above its pillars, the side the light goes to — designs saved before this field keep that meaning.
       */
      lightFrom: z.enum(LIGHT_SIDES, { error: "lightFrom must be 'substrate' (light enters through the substrate) or 'superstrate' (onto the pillars)" }).default('substrate'),
    }),
    polarization: polarizationStateSchema,
    channels: z.object({ a: channelRecipeSchema, b: channelRecipeSchema }),
    atomLibrary: atomLibraryRefSchema.default({ source: 'demo' }),
    simulation: z
      .object({
        /** The third preview input, e.g. linear 45° which shows both channels at once. */
        extraInput: polarizationStateSchema.default({ kind: 'linear', angleDeg: 45 }),
        /** Planes of the x–z slice for beam channels; omitted: chosen from the non-diffracting length. */
        beamZUm: z
          .object({ start: finite('start'), end: finite('end'), steps: z.number().int().min(2).max(256) })
          .refine((v) => v.end > v.start, 'end must be greater than start')
          .optional(),
        /** Zero-padding factor of angular-spectrum propagation (1: none). */
        padding: z.union([z.literal(1), z.literal(2)]).default(2),
      })
      .default({ extraInput: { kind: 'linear', angleDeg: 45 }, padding: 2 }),
    layout: z
      .object({
        layer: z.number().int().min(0).max(255).default(1),
        datatype: z.number().int().min(0).max(255).default(0),
      })
      .default({ layer: 1, datatype: 0 }),
    designRules: z
      .object({
        minGapNm: positive('minGapNm').default(50),
        minFeatureNm: positive('minFeatureNm').default(100),
        maxAspectRatio: positive('maxAspectRatio').default(10),
      })
      .default({ minGapNm: 50, minFeatureNm: 100, maxAspectRatio: 10 }),
  })
  .refine((d) => d.setup.periodNm < d.setup.wavelengthNm, {
    message: 'periodNm must be smaller than wavelengthNm (a sub-wavelength lattice)',
    path: ['setup', 'periodNm'],
  });

export type DesignInput = z.input<typeof designSchema>;
export type Design = z.output<typeof designSchema>;

/** Human-readable list of what is wrong with a design, one line per field path. */
export function describeDesignIssues(error: z.ZodError): string[] {
  return error.issues.map((issue) => `${issue.path.length ? issue.path.join('.') : '(design)'}: ${issue.message}`);
}
