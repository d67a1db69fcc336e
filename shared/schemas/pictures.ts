/**
 * The frame of a run's previews (README "Picture convention"), as metrics.json and the run row's plots
 * carry it under `pictures`: the convention version, and per preview file the values at its edges and what
 * its colours mean. Runs without it were painted in the first convention (array row 0 at the top: v down).
 */
import { z } from 'zod';

/** Version of the picture convention: 2 = x right, y up, seen facing the device from the side the light goes to. */
export const PICTURE_CONVENTION = 2;

export const pictureAxisSchema = z.object({
  label: z.string(),
  /** '' for direction cosines and other pure numbers. */
  unit: z.string(),
  /** Value at the left edge (x axis) or the bottom edge (y axis) of the picture. */
  from: z.number(),
  /** Value at the right edge (x axis) or the top edge (y axis). */
  to: z.number(),
});

export const pictureKeySchema = z.object({
  colours: z.enum(['sequential', 'cyclic', 'index']),
  quantity: z.string(),
  from: z.string(),
  to: z.string(),
});

export const pictureFrameSchema = z.object({ x: pictureAxisSchema, y: pictureAxisSchema, key: pictureKeySchema });

export const pictureFramesSchema = z.object({
  convention: z.number().int(),
  meaning: z.string(),
  frames: z.record(z.string(), pictureFrameSchema),
});

export type PictureAxis = z.infer<typeof pictureAxisSchema>;
export type PictureKey = z.infer<typeof pictureKeySchema>;
export type PictureFrame = z.infer<typeof pictureFrameSchema>;
export type PictureFrames = z.infer<typeof pictureFramesSchema>;

const axisText = (axis: PictureAxis, towards: string) => {
  const number = (v: number) => (Math.abs(v) >= 100 ? v.toFixed(0) : v.toPrecision(3)).replace('-', '−');
  return `${axis.label} from ${number(axis.from)} to ${number(axis.to)}${axis.unit ? ` ${axis.unit}` : ''} ${towards}`;
};

/**
 * A preview's frame in words, for captions outside the app (the fab package's report): its axes and their
 * directions, or a note that the run predates the convention. Example: "u = sin θx from −1.00 to 0.996 to the
 * right, v = sin θy from −1.00 to 0.996 upwards".
 */
export function pictureFrameText(plotsPictures: unknown, name: string): string | null {
  const parsed = pictureFramesSchema.safeParse(plotsPictures);
  if (!parsed.success) return name.endsWith('.png') ? 'painted before the picture convention: y (v) grows downwards' : null;
  const frame = parsed.data.frames[name];
  return frame ? `${axisText(frame.x, 'to the right')}, ${axisText(frame.y, 'upwards')}` : null;
}
