/**
 * In a browser (imported by .web files only): QR codes read from pixels with jsQR (a decoder that needs no native code), or with
 * the browser's own BarcodeDetector where it has one (Chromium on Android and macOS).
 */
import type jsQRType from 'jsqr';

/** Large phone photos are read at this long side: plenty for a code filling a fifth of the frame, far quicker. */
const LONG_SIDE = 1600;

interface DetectedBarcode {
  rawValue: string;
}
interface BarcodeDetectorLike {
  detect(source: CanvasImageSource | ImageBitmap): Promise<DetectedBarcode[]>;
}
type DetectorClass = { new (options: { formats: string[] }): BarcodeDetectorLike; getSupportedFormats?: () => Promise<string[]> };

let detector: Promise<BarcodeDetectorLike | null> | null = null;
/** The browser's detector when it reads QR codes; null otherwise (jsQR then). */
export function nativeDetector(): Promise<BarcodeDetectorLike | null> {
  detector ??= (async () => {
    const Detector = (globalThis as { BarcodeDetector?: DetectorClass }).BarcodeDetector;
    if (!Detector) return null;
    try {
      const formats = (await Detector.getSupportedFormats?.()) ?? ['qr_code'];
      return formats.includes('qr_code') ? new Detector({ formats: ['qr_code'] }) : null;
    } catch {
      return null;
    }
  })();
  return detector;
}

let decoder: Promise<typeof jsQRType> | null = null;
/**
 * jsQR (about 130 KB of script) is fetched the first time a code is read, not with the app: the
 * app starts quicker on a slow phone, and the service worker keeps the piece for offline use.
 */
function loadJsQR(): Promise<typeof jsQRType> {
  decoder ??= import('jsqr').then((m) => m.default);
  return decoder;
}

/** The code in these pixels (jsQR), or null. */
export async function decodePixels(data: Uint8ClampedArray, width: number, height: number): Promise<string | null> {
  const jsQR = await loadJsQR();
  return jsQR(data, width, height, { inversionAttempts: 'attemptBoth' })?.data ?? null;
}

/** Draws a source scaled to at most LONG_SIDE into a canvas and reads its pixels. */
export function pixelsOf(source: CanvasImageSource, width: number, height: number): { data: Uint8ClampedArray; width: number; height: number } | null {
  const scale = Math.min(1, LONG_SIDE / Math.max(width, height));
  const w = Math.max(1, Math.round(width * scale));
  const h = Math.max(1, Math.round(height * scale));
  const canvas = document.createElement('canvas');
  canvas.width = w;
  canvas.height = h;
  const ctx = canvas.getContext('2d', { willReadFrequently: true });
  if (!ctx) return null;
  ctx.drawImage(source, 0, 0, w, h);
  return { data: ctx.getImageData(0, 0, w, h).data, width: w, height: h };
}

/** The code in an image file the person chose, or null. Browser only (canvas, createImageBitmap). */
export async function decodeImageFile(file: Blob): Promise<string | null> {
  const bitmap = await createImageBitmap(file);
  try {
    const native = await nativeDetector();
    if (native) {
      const found = await native.detect(bitmap).catch(() => []);
      if (found[0]?.rawValue) return found[0].rawValue;
    }
    const pixels = pixelsOf(bitmap, bitmap.width, bitmap.height);
    return pixels ? await decodePixels(pixels.data, pixels.width, pixels.height) : null;
  } finally {
    bitmap.close();
  }
}
