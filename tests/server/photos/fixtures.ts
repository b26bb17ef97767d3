/**
 * Photo fixtures for the photo tests, made in the test run with sharp (nothing downloaded):
 * two-colour images whose halves show where the pixels went after rotation.
 */
import { deflateSync } from 'node:zlib';
import sharp from 'sharp';
import type { PendingUploads } from '../../../server/services/pendingUploads';

export const RED = { r: 220, g: 30, b: 30 };
export const BLUE = { r: 30, g: 30, b: 220 };

/** Raw RGB pixels: left half red, right half blue. */
export function halves(width: number, height: number): Buffer {
  const data = Buffer.alloc(width * height * 3);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const c = x < width / 2 ? RED : BLUE;
      data.set([c.r, c.g, c.b], (y * width + x) * 3);
    }
  }
  return data;
}

export function halvesImage(width: number, height: number) {
  return sharp(halves(width, height), { raw: { width, height, channels: 3 } });
}

/**
 * A JPEG as a phone writes it: the sensor's landscape pixels (200 x 100, red left, blue right)
 * with EXIF Orientation 6 (display rotated 90 degrees clockwise), a camera make and a GPS
 * position (invented: a point in the North Sea).
 */
export function phoneJpeg(): Promise<Buffer> {
  return halvesImage(200, 100)
    .jpeg({ quality: 90 })
    .withMetadata({ orientation: 6 })
    .withExif({
      IFD0: { Make: 'Test Camera', Software: 'fixture' },
      IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '55/1 30/1 0/1', GPSLongitudeRef: 'E', GPSLongitude: '3/1 15/1 0/1' },
    })
    .toBuffer();
}

/** The average colour of a region of an image, from its decoded pixels. */
export async function colourAt(image: Buffer, left: number, top: number, width = 4, height = 4) {
  const { data, info } = await sharp(image).extract({ left, top, width, height }).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  const sum = [0, 0, 0];
  for (let i = 0; i < data.length; i += info.channels) for (let c = 0; c < 3; c++) sum[c]! += data[i + c]!;
  const n = data.length / info.channels;
  return { r: sum[0]! / n, g: sum[1]! / n, b: sum[2]! / n };
}

export function isRed(c: { r: number; g: number; b: number }) {
  return c.r > 150 && c.b < 100;
}
export function isBlue(c: { r: number; g: number; b: number }) {
  return c.b > 150 && c.r < 100;
}

/** CRC-32 of PNG chunks (ISO/IEC 15948 Annex D). */
function crc32(buf: Buffer): number {
  let c = ~0;
  for (const byte of buf) {
    c ^= byte;
    for (let k = 0; k < 8; k++) c = c & 1 ? (c >>> 1) ^ 0xedb88320 : c >>> 1;
  }
  return ~c >>> 0;
}

function chunk(type: string, data: Buffer): Buffer {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'latin1'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([len, body, crc]);
}

/**
 * A pixel flood: a valid PNG header that declares width x height (20000 x 20000 = 400 MP),
 * followed by a few bytes of compressed zeros. Small on the wire, huge if decoded.
 */
export function pixelFloodPng(width = 20_000, height = 20_000): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 0; // greyscale
  ihdr[10] = 0;
  ihdr[11] = 0;
  ihdr[12] = 0;
  const rows = deflateSync(Buffer.alloc((width + 1) * 64)); // the first 64 rows only
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', rows),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

/**
 * A 64 x 48 HEIC (HEVC in HEIF, brand heic): red left half, blue right half. Made once from a
 * sharp-generated PNG with libheif's heif-enc (Debian libheif-examples 1.15.1, x265), since no
 * npm package encodes HEVC; 545 bytes, kept here as base64.
 */
export const SAMPLE_HEIC = Buffer.from(
  'AAAAHGZ0eXBoZWljAAAAAG1pZjFoZWljbWlhZgAAAa1tZXRhAAAAAAAAACFoZGxyAAAAAAAAAABwaWN0AAAAAAAAAAAAAAAAAAAAAA5waXRtAAAAAAACAAAAEGlkYXQAAAAAAEAAMAAAADhpbG9jAQAAAERAAAIAAQAAAAAAAAHRAAEAAAAAAAAAUAACAAEAAAAAAAAAAQAAAAAAAAAIAAAAOGlpbmYAAAAAAAIAAAAVaW5mZQIAAAEAAQAAaHZjMQAAAAAVaW5mZQIAAAAAAgAAZ3JpZAAAAADYaXBycAAAALZpcGNvAAAAdmh2Y0MBA3AAAAAAAAAAAAAe8AD8/fj4AAAPAyAAAQAYQAEMAf//A3AAAAMAkAAAAwAAAwAeugJAIQABACpCAQEDcAAAAwCQAAADAAADAB6gIIEFlurkprm4EBAwIAAAAwAgAAADACEiAAEABkQBwXPAiQAAABRpc3BlAAAAAAAAAEAAAABAAAAAFGlzcGUAAAAAAAAAQAAAADAAAAAQcGl4aQAAAAADCAgIAAAAGmlwbWEAAAAAAAAAAgABAoECAAICA4QAAAAaaXJlZgAAAAAAAAAOZGltZwACAAEAAQAAAFhtZGF0AAAATCgBrxOA+BDhp//7QKP/4BM8Pye9Jif/4UcEf1C8P/yavDu724Iw2Odqg8D72Q5sFrPcJlNzLuZgQ94nsb48Udt6v1rrT+ZKCzzkU4A=',
  'base64',
);

export const SVG = Buffer.from('<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script></svg>');
export const TEXT_AS_JPEG = Buffer.from('This is a plain text file that someone renamed to photo.jpg\n');

/** The pending-uploads record in memory, for tests of the photo services without a database. */
export function memoryPending(): PendingUploads & { keys: Set<string> } {
  const keys = new Set<string>();
  return {
    keys,
    record: async (ks) => void ks.forEach((k) => keys.add(k)),
    claim: async (ks) => void ks.forEach((k) => keys.delete(k)),
    release: async (ks) => void ks.forEach((k) => keys.delete(k)),
  };
}
