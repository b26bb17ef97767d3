/**
 * Photos are made smaller on the device before they are kept or sent: the long side at most
 * MAX_LONG_SIDE pixels, JPEG, turned the way the camera recorded it (EXIF orientation applied
 * while decoding, so the pixels themselves stand the right way up). A photo already that small
 * is kept as it was. A 12-megapixel phone photo of 4-6 MB becomes about 1 MB, so a walk of 40
 * photos fits on the phone and goes up quickly on a weak signal.
 *
 * On the web this uses createImageBitmap and a canvas; where they are missing (native builds,
 * jest) or the browser cannot decode the file (HEIC in most browsers), the original goes as it is
 * and the server, which decodes every format it accepts, handles it.
 */
import type { UploadPhoto } from '../queries/findings';

export const MAX_LONG_SIDE = 2560;
/** JPEG quality of a downscaled photo: defects stay legible, the file stays small. */
export const JPEG_QUALITY = 0.85;

export type DownscalePlan = { action: 'keep' } | { action: 'resize'; width: number; height: number };

/** What to do with a photo of this size (already turned by its orientation). */
export function downscalePlan(size: { width: number; height: number }, maxLongSide = MAX_LONG_SIDE): DownscalePlan {
  const long = Math.max(size.width, size.height);
  if (!(long > maxLongSide) || size.width <= 0 || size.height <= 0) return { action: 'keep' };
  const scale = maxLongSide / long;
  // The long side lands exactly on the limit; the short one is rounded and never 0.
  const width = size.width >= size.height ? maxLongSide : Math.max(1, Math.round(size.width * scale));
  const height = size.height > size.width ? maxLongSide : Math.max(1, Math.round(size.height * scale));
  return { action: 'resize', width, height };
}

/** The file name of the downscaled JPEG. */
export function jpegName(name: string): string {
  const base = name.replace(/\.[A-Za-z0-9]{1,5}$/, '');
  return `${base || 'photo'}.jpg`;
}

type Bitmap = { width: number; height: number; close(): void };
type BitmapOptions = { imageOrientation?: 'from-image' | 'none' | 'flipY'; resizeWidth?: number; resizeHeight?: number; resizeQuality?: 'high' | 'medium' | 'low' | 'pixelated' };
type MakeBitmap = (blob: Blob, options?: BitmapOptions) => Promise<Bitmap>;
type Canvas2d = { drawImage(image: Bitmap, x: number, y: number): void };
type AnyCanvas = {
  width: number;
  height: number;
  getContext(kind: '2d'): Canvas2d | null;
  convertToBlob?: (options: { type: string; quality: number }) => Promise<Blob>;
  toBlob?: (done: (blob: Blob | null) => void, type: string, quality: number) => void;
};

function makeCanvas(width: number, height: number): AnyCanvas | null {
  const g = globalThis as { OffscreenCanvas?: new (w: number, h: number) => AnyCanvas; document?: { createElement(tag: 'canvas'): AnyCanvas } };
  if (g.OffscreenCanvas) return new g.OffscreenCanvas(width, height);
  if (g.document) {
    const c = g.document.createElement('canvas');
    c.width = width;
    c.height = height;
    return c;
  }
  return null;
}

function encodeJpeg(canvas: AnyCanvas): Promise<Blob | null> {
  if (canvas.convertToBlob) return canvas.convertToBlob({ type: 'image/jpeg', quality: JPEG_QUALITY });
  const toBlob = canvas.toBlob;
  if (!toBlob) return Promise.resolve(null);
  return new Promise((resolve) => toBlob.call(canvas, resolve, 'image/jpeg', JPEG_QUALITY));
}

/** The Blob downscaled to at most MAX_LONG_SIDE as JPEG, or null when it is small already or cannot be decoded here. */
export async function downscaleBlob(blob: Blob, maxLongSide = MAX_LONG_SIDE): Promise<Blob | null> {
  const make = (globalThis as { createImageBitmap?: MakeBitmap }).createImageBitmap;
  if (!make) return null;
  let probe: Bitmap;
  try {
    probe = await make(blob, { imageOrientation: 'from-image' });
  } catch {
    return null;
  }
  const plan = downscalePlan(probe, maxLongSide);
  probe.close();
  if (plan.action === 'keep') return null;
  let scaled: Bitmap;
  try {
    scaled = await make(blob, { imageOrientation: 'from-image', resizeWidth: plan.width, resizeHeight: plan.height, resizeQuality: 'high' });
  } catch {
    return null;
  }
  try {
    const canvas = makeCanvas(plan.width, plan.height);
    const ctx = canvas?.getContext('2d');
    if (!canvas || !ctx) return null;
    ctx.drawImage(scaled, 0, 0);
    return await encodeJpeg(canvas);
  } finally {
    scaled.close();
  }
}

/** A picked photo, downscaled when it is larger than the limit (a new preview address), else the same photo. */
export async function downscalePhoto<P extends UploadPhoto>(photo: P): Promise<P> {
  if (!photo.blob) return photo;
  const smaller = await downscaleBlob(photo.blob);
  if (!smaller) return photo;
  const g = globalThis as { URL?: { createObjectURL?(b: Blob): string; revokeObjectURL?(u: string): void } };
  if (photo.uri.startsWith('blob:')) g.URL?.revokeObjectURL?.(photo.uri);
  return { ...photo, name: jpegName(photo.name), type: 'image/jpeg', blob: smaller, uri: g.URL?.createObjectURL?.(smaller) ?? photo.uri };
}
