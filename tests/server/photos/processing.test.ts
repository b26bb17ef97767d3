/**
 * Photo processing (server/services/photos.ts): type from the bytes, orientation applied,
 * metadata (EXIF, GPS) dropped, thumbnails, and every kind of refusal. Fixtures are made here
 * with sharp (see fixtures.ts); nothing touches the database or the network.
 */
import sharp from 'sharp';
import { HttpError } from '../../../server/errors';
import {
  FULL_MAX_EDGE,
  PHOTO_PIXEL_LIMIT,
  PHOTO_REQUEST_PIXEL_BUDGET,
  THUMB_EDGE,
  detectPhotoType,
  processPhoto,
  processPhotos,
} from '../../../server/services/photos';
import { SAMPLE_HEIC, SVG, TEXT_AS_JPEG, colourAt, halvesImage, isBlue, isRed, phoneJpeg, pixelFloodPng } from './fixtures';

async function refusal(promise: Promise<unknown>): Promise<HttpError> {
  try {
    await promise;
  } catch (err) {
    if (err instanceof HttpError) return err;
    throw err;
  }
  throw new Error('expected the photo to be refused');
}

function isJpeg(buf: Buffer) {
  return buf[0] === 0xff && buf[1] === 0xd8 && buf[2] === 0xff;
}

describe('processPhoto: accepted photos', () => {
  it('applies EXIF orientation 6 and drops all metadata, GPS included', async () => {
    const input = await phoneJpeg();
    const inMeta = await sharp(input).metadata();
    // The fixture really carries what a phone writes.
    expect(inMeta.orientation).toBe(6);
    expect(inMeta.exif).toBeDefined();
    expect(inMeta.exif!.includes(Buffer.from([0x88, 0x25])) || inMeta.exif!.includes(Buffer.from([0x25, 0x88]))).toBe(true); // GPS IFD pointer tag
    expect(inMeta.exif!.toString('latin1')).toContain('Test Camera');

    const out = await processPhoto(input);
    expect(out.detectedType).toBe('image/jpeg');
    // 200 x 100 sensor pixels shown rotated 90 degrees clockwise: 100 wide, 200 high.
    expect([out.width, out.height]).toEqual([100, 200]);
    const meta = await sharp(out.full).metadata();
    expect(meta.format).toBe('jpeg');
    expect([meta.width, meta.height]).toEqual([100, 200]);
    expect(meta.exif).toBeUndefined();
    expect(meta.xmp).toBeUndefined();
    expect(meta.iptc).toBeUndefined();
    expect(meta.icc).toBeUndefined();
    expect(meta.orientation).toBeUndefined();
    expect(out.full.includes(Buffer.from('Test Camera'))).toBe(false);
    // Rotated clockwise, the red left half is now on top and the blue right half below.
    expect(isRed(await colourAt(out.full, 48, 10))).toBe(true);
    expect(isBlue(await colourAt(out.full, 48, 186))).toBe(true);

    const thumbMeta = await sharp(out.thumb).metadata();
    expect(thumbMeta.format).toBe('jpeg');
    expect(thumbMeta.exif).toBeUndefined();
    // The print copy too: upright (blue below red) and without the camera's metadata.
    const printMeta = await sharp(out.print).metadata();
    expect(printMeta.format).toBe('jpeg');
    expect(printMeta.exif).toBeUndefined();
    expect(out.print.includes(Buffer.from('Test Camera'))).toBe(false);
    expect([printMeta.width, printMeta.height]).toEqual([out.width, out.height]);
    expect(out.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('re-encodes a PNG with transparency as a JPEG on white, with a thumbnail of at most 320 px', async () => {
    const png = await sharp({ create: { width: 1200, height: 800, channels: 4, background: { r: 0, g: 0, b: 0, alpha: 0 } } })
      .composite([{ input: await halvesImage(600, 800).png().toBuffer(), left: 600, top: 0 }])
      .png()
      .toBuffer();
    const out = await processPhoto(png);
    expect(out.detectedType).toBe('image/png');
    expect(isJpeg(out.full) && isJpeg(out.thumb)).toBe(true);
    expect([out.width, out.height]).toEqual([1200, 800]);
    const white = await colourAt(out.full, 100, 100);
    expect(Math.min(white.r, white.g, white.b)).toBeGreaterThan(240);
    const thumb = await sharp(out.thumb).metadata();
    expect([thumb.width, thumb.height]).toEqual([THUMB_EDGE, 213]);
  });

  it('reads WebP', async () => {
    const webp = await halvesImage(300, 200).webp().toBuffer();
    const out = await processPhoto(webp);
    expect(out.detectedType).toBe('image/webp');
    expect([out.width, out.height]).toEqual([300, 200]);
    expect(isRed(await colourAt(out.full, 10, 100))).toBe(true);
    expect(isBlue(await colourAt(out.full, 280, 100))).toBe(true);
  });

  it('reads HEIC (HEVC) through heic-decode, since sharp cannot decode HEVC', async () => {
    const out = await processPhoto(SAMPLE_HEIC);
    expect(out.detectedType).toBe('image/heic');
    expect([out.width, out.height]).toEqual([64, 48]);
    expect(isJpeg(out.full)).toBe(true);
    expect(isRed(await colourAt(out.full, 4, 20))).toBe(true);
    expect(isBlue(await colourAt(out.full, 56, 20))).toBe(true);
    expect((await sharp(out.full).metadata()).exif).toBeUndefined();
  });

  it(`caps the long edge of the stored photo at ${FULL_MAX_EDGE} px`, async () => {
    const big = await sharp({ create: { width: 4400, height: 1100, channels: 3, background: '#777' } }).jpeg().toBuffer();
    const out = await processPhoto(big);
    expect([out.width, out.height]).toEqual([FULL_MAX_EDGE, 1024]);
    const thumb = await sharp(out.thumb).metadata();
    expect([thumb.width, thumb.height]).toEqual([THUMB_EDGE, 80]);
    // 4:1, held by the print box's width: 531 px (255 pt / 72 × 150 dpi) by 1024 × 531 / 4096 = 132.75 → 133.
    const print = await sharp(out.print).metadata();
    expect([print.width, print.height]).toEqual([531, 133]);
  });
});

describe('processPhoto: refusals', () => {
  it('refuses an empty (0-byte) file with 400', async () => {
    const err = await refusal(processPhoto(Buffer.alloc(0)));
    expect([err.status, err.id]).toEqual([400, 'empty_photo']);
    expect(err.message).toMatch(/empty \(0 bytes\)/);
  });

  it('refuses a text file named .jpg with 415 (the type comes from the bytes)', async () => {
    const err = await refusal(processPhoto(TEXT_AS_JPEG));
    expect([err.status, err.id]).toEqual([415, 'unsupported_photo_type']);
    expect(err.message).toBe('This file is not an image. Photos must be JPEG, PNG, WebP or HEIC images.');
  });

  it('refuses SVG and GIF with 415', async () => {
    const svg = await refusal(processPhoto(SVG));
    expect([svg.status, svg.message]).toEqual([415, 'This file is an SVG drawing, which is not accepted. Photos must be JPEG, PNG, WebP or HEIC images.']);
    const gif = await refusal(processPhoto(await halvesImage(20, 20).gif().toBuffer()));
    expect([gif.status, gif.message]).toEqual([415, 'This file is a GIF image, which is not accepted. Photos must be JPEG, PNG, WebP or HEIC images.']);
  });

  it('refuses a truncated JPEG and a truncated PNG with 400', async () => {
    const jpeg = await halvesImage(400, 300).jpeg().toBuffer();
    const cut = await refusal(processPhoto(jpeg.subarray(0, Math.floor(jpeg.length * 0.6))));
    expect([cut.status, cut.id]).toEqual([400, 'unreadable_photo']);
    expect(cut.message).toMatch(/damaged or incomplete/);
    const png = await halvesImage(400, 300).png({ compressionLevel: 0 }).toBuffer();
    expect((await refusal(processPhoto(png.subarray(0, Math.floor(png.length / 2))))).status).toBe(400);
    // Only the magic number of a JPEG.
    expect((await refusal(processPhoto(Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0, 0])))).status).toBe(400);
  });

  it('refuses a truncated HEIC with 400', async () => {
    const err = await refusal(processPhoto(SAMPLE_HEIC.subarray(0, 300)));
    expect([err.status, err.id]).toEqual([400, 'unreadable_photo']);
  });

  it('refuses a pixel flood (a PNG that declares 20000 x 20000) before decoding it', async () => {
    const flood = pixelFloodPng();
    expect(flood.length).toBeLessThan(10_000);
    const started = Date.now();
    const err = await refusal(processPhoto(flood));
    expect([err.status, err.id]).toEqual([413, 'too_many_pixels']);
    expect(err.message).toBe('The photo is 20000 × 20000 pixels; at most 40 megapixels are accepted.');
    expect(Date.now() - started).toBeLessThan(1000);
  });

  it('refuses a real image just over the pixel limit', async () => {
    const width = 8000;
    const height = Math.ceil(PHOTO_PIXEL_LIMIT / width) + 1;
    const png = await sharp({ create: { width, height, channels: 3, background: '#000' } }).png().toBuffer();
    expect((await refusal(processPhoto(png))).status).toBe(413);
  });

  it('names the photo refused among several', async () => {
    const ok = await halvesImage(40, 20).jpeg().toBuffer();
    const err = await refusal(processPhotos([{ buffer: ok }, { buffer: TEXT_AS_JPEG }]));
    expect(err.message).toBe('Photo 2 of 2: This file is not an image. Photos must be JPEG, PNG, WebP or HEIC images.');
  });

  it('refuses photos that together exceed the per-request pixel budget from their headers, before charging or decoding any', async () => {
    // Three headers of 6000 x 6000 (36 MP each, each under the per-photo limit): 108 MP together.
    const flood = pixelFloodPng(6000, 6000);
    const charged: number[] = [];
    const started = Date.now();
    const err = await refusal(processPhotos([{ buffer: flood }, { buffer: flood }, { buffer: flood }], { charge: (px) => charged.push(px) }));
    expect([err.status, err.id]).toEqual([413, 'pixel_budget_exceeded']);
    expect(err.message).toBe(
      `These 3 photos have 108 megapixels together; at most ${PHOTO_REQUEST_PIXEL_BUDGET / 1_000_000} megapixels are accepted in one request. Send fewer photos at a time.`,
    );
    expect(charged).toEqual([]);
    expect(Date.now() - started).toBeLessThan(1000);
  });

  it("charges the request's pixels before decoding, and decodes nothing when the charge is refused", async () => {
    const ok = await halvesImage(40, 20).jpeg().toBuffer();
    const charged: number[] = [];
    await processPhotos([{ buffer: ok }, { buffer: ok }], { charge: (px) => charged.push(px) });
    expect(charged).toEqual([1600]);
    const spent = new HttpError(429, 'too_many_requests', 'spent');
    // A truncated second photo would be refused (400) when decoded: the 429 comes first.
    const refuse = () => {
      throw spent;
    };
    await expect(processPhotos([{ buffer: ok }, { buffer: ok.subarray(0, ok.length - 40) }], { charge: refuse })).rejects.toBe(spent);
  });
});

describe('detectPhotoType', () => {
  it.each([
    ['JPEG', 'image/jpeg', Buffer.from([0xff, 0xd8, 0xff, 0xdb])],
    ['PNG', 'image/png', Buffer.from('89504e470d0a1a0a0000', 'hex')],
    ['WebP', 'image/webp', Buffer.from('RIFF\0\0\0\0WEBPVP8 ', 'latin1')],
    ['HEIC', 'image/heic', SAMPLE_HEIC],
    ['HEIF mif1 with heic brand', 'image/heic', Buffer.from('\0\0\0\x18ftypmif1\0\0\0\0mif1heic', 'latin1')],
  ])('%s is %s', (_name, type, bytes) => {
    expect(detectPhotoType(bytes)).toEqual({ type });
  });

  it.each([
    ['empty', Buffer.alloc(0)],
    ['GIF', Buffer.from('GIF89a....', 'latin1')],
    ['SVG with a BOM and spaces', Buffer.from('\uFEFF  <svg xmlns="http://www.w3.org/2000/svg"/>')],
    ['AVIF', Buffer.from('\0\0\0\x1cftypavif\0\0\0\0avifmif1miaf', 'latin1')],
    ['MP4 video', Buffer.from('\0\0\0\x18ftypisom\0\0\0\0isomavc1', 'latin1')],
    ['PDF', Buffer.from('%PDF-1.7\n')],
    ['HTML', Buffer.from('<html><script>alert(1)</script></html>')],
  ])('%s is refused', (_name: string, bytes: Buffer) => {
    expect(detectPhotoType(bytes)).toHaveProperty('refused');
  });
});
