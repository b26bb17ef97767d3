/**
 * Marks drawn on a photo: arrows, ellipses, rectangles, freehand lines and short text labels.
 * Stored as data beside the untouched original (the server draws a flattened copy from them).
 * Coordinates are fractions 0..1 of the image's width (x) and height (y), so the marks fit the
 * photo at any size it is shown. Colours come from a small palette; every mark is drawn with a
 * contrasting outline (MARK_OUTLINE) so it stays legible on dark and light parts of a photo.
 */
import { z } from 'zod';
import { id, limited, textLimit } from './fields';
import './plainWords';

export const MARK_COLOURS = ['red', 'yellow', 'green', 'blue', 'white', 'black'] as const;
export type MarkColour = (typeof MARK_COLOURS)[number];

/** The colour of each palette entry and the outline drawn around it. */
export const MARK_PAINT: Record<MarkColour, { fill: string; outline: string }> = {
  red: { fill: '#ff2d2d', outline: '#ffffff' },
  yellow: { fill: '#ffd400', outline: '#000000' },
  green: { fill: '#2ee66b', outline: '#000000' },
  blue: { fill: '#2f6bff', outline: '#ffffff' },
  white: { fill: '#ffffff', outline: '#000000' },
  black: { fill: '#000000', outline: '#ffffff' },
};

/** Stroke width, outline width and label size for an image of this size (the server's flattened copy and the editor alike). */
export function markSizes(width: number, height: number) {
  const stroke = Math.max(3, Math.round(Math.max(width, height) * 0.006));
  return { stroke, outline: Math.max(2, Math.round(stroke * 0.6)), font: Math.max(14, Math.round(Math.min(width, height) * 0.045)) };
}

export const MAX_MARKS = 50;
export const MAX_FREEHAND_POINTS = 500;
export const MARK_TEXT_LIMIT = textLimit(40, 'A label');

const fraction = () => z.number({ error: 'A number from 0 to 1.' }).min(0, 'From 0 to 1.').max(1, 'From 0 to 1.');
const point = z.object({ x: fraction(), y: fraction() }).strict();
const colour = z.enum(MARK_COLOURS, { error: `Choose a colour: ${MARK_COLOURS.join(', ')}.` });

export const arrowMarkSchema = z.object({ kind: z.literal('arrow'), colour, from: point, to: point }).strict();
/** An ellipse (a circle when rx and ry match on the shown image): centre, radii as fractions of width and height. */
export const ellipseMarkSchema = z
  .object({ kind: z.literal('ellipse'), colour, center: point, rx: fraction(), ry: fraction() })
  .strict();
export const rectMarkSchema = z
  .object({ kind: z.literal('rect'), colour, x: fraction(), y: fraction(), w: fraction(), h: fraction() })
  .strict()
  .refine((r) => r.x + r.w <= 1 + 1e-9, { path: ['w'], error: 'The rectangle runs off the right of the photo.' })
  .refine((r) => r.y + r.h <= 1 + 1e-9, { path: ['h'], error: 'The rectangle runs off the bottom of the photo.' });
export const freehandMarkSchema = z
  .object({
    kind: z.literal('freehand'),
    colour,
    points: z.array(point).min(2, 'A line needs at least 2 points.').max(MAX_FREEHAND_POINTS, `A line has at most ${MAX_FREEHAND_POINTS} points.`),
  })
  .strict();
export const textMarkSchema = z
  .object({
    kind: z.literal('text'),
    colour,
    at: point,
    text: limited(z.string({ error: 'Type the label.' }).trim().min(1, 'Type the label.'), MARK_TEXT_LIMIT),
  })
  .strict();

export const markSchema = z.discriminatedUnion('kind', [arrowMarkSchema, ellipseMarkSchema, rectMarkSchema, freehandMarkSchema, textMarkSchema], {
  error: 'A mark is an arrow, ellipse, rect, freehand line or text.',
});
export type Mark = z.infer<typeof markSchema>;

/** PUT body: the whole list (an empty list clears the marks and the original is shown again). */
export const putPhotoMarksSchema = z
  .object({ marks: z.array(markSchema, { error: 'Send the marks as a list.' }).max(MAX_MARKS, `At most ${MAX_MARKS} marks on one photo.`) })
  .strict();
export type PutPhotoMarks = z.infer<typeof putPhotoMarksSchema>;

export const photoMarksParamsSchema = z.object({ photoId: id('photo id') }).strict();

/** `?original=1` on a photo address: the photo as taken, without its marks. */
export const photoServeQuerySchema = z
  .object({
    original: z.literal('1', { error: 'Use original=1.' }).optional(),
    /** Not read: the app gives a photo a new address after its marks change, so the new picture is fetched. */
    m: z.string().regex(/^\d{1,16}$/, 'A number.').optional(),
  })
  .strict();

/** GET and PUT answer (ETag "v<version>"; version 0 before any marks were saved). */
export interface PhotoMarks {
  photoId: string;
  marks: Mark[];
  version: number;
  updatedAt: string | null;
}
