/**
 * Serving the exported web app: compressed on the wire (brotli, else gzip, as the browser says it
 * accepts), hashed bundles cached for a year, client routes answered with index.html. A cold start
 * on a slow phone connection is mostly the bundle's bytes.
 *
 * Installable and offline: the build's own step (scripts/lib/pwa.ts) runs over the fixture export,
 * and its manifest, icons and service worker are read back through the server.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import sharp from 'sharp';
import request from 'supertest';
import { colors } from '../../../components/theme';
import { precompress } from '../../../scripts/lib/precompress';
import { addOfflineShell, APPLE_TOUCH_ICON } from '../../../scripts/lib/pwa';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildTestApp, testEnv } from '../../support/app';
import { connectTestDb } from '../../support/db';

// The build's own service worker step bundles workbox (rollup + terser): seconds, not milliseconds.
jest.setTimeout(120_000);

let db: Database;
let trimout: TrimoutApp;
let dist: string;
const BUNDLE = '/_expo/static/js/web/entry-0123456789abcdef.js';
const FONT = '/assets/node_modules/@expo-google-fonts/x/Font_400Regular.59f0f5543754fa6b68a563036eafaaab.ttf';
// Text shaped like a bundle: repetitive identifiers, as minified JavaScript is.
const js = Array.from({ length: 4000 }, (_, i) => `function c${i}(a,b){return a.map(function(x){return x+b*${i % 97}})};`).join('\n');

beforeAll(async () => {
  dist = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-dist-'));
  fs.mkdirSync(path.join(dist, path.dirname(BUNDLE)), { recursive: true });
  fs.writeFileSync(path.join(dist, BUNDLE), js);
  fs.writeFileSync(path.join(dist, 'index.html'), `<!doctype html><html><head><title>Trimout</title></head><body><div id="root"></div><script src="${BUNDLE}" defer></script></body></html>`);
  // The rest of what `expo export` writes: a font (hashed name) and the favicon.
  fs.mkdirSync(path.join(dist, path.dirname(FONT)), { recursive: true });
  fs.writeFileSync(path.join(dist, FONT), 'font bytes '.repeat(500));
  fs.writeFileSync(path.join(dist, 'favicon.ico'), 'icon bytes');
  // and public/, copied as it is (the page's early session read)
  fs.copyFileSync(path.resolve(__dirname, '../../../public/early-session.js'), path.join(dist, 'early-session.js'));
  await addOfflineShell(dist);
  await precompress(dist);
  db = await connectTestDb();
  trimout = buildTestApp(db, { env: testEnv({ WEB_DIST: dist }) });
});
afterAll(async () => {
  await trimout.close();
  await db.close();
  fs.rmSync(dist, { recursive: true, force: true });
});

/** The bytes as they cross the wire (supertest would decode them): a plain GET on a listening server. */
async function wire(pathname: string, acceptEncoding: string): Promise<{ headers: http.IncomingHttpHeaders; body: Buffer }> {
  const server = trimout.app.listen(0, '127.0.0.1');
  await new Promise((r) => server.once('listening', r));
  try {
    const { port } = server.address() as AddressInfo;
    return await new Promise((resolve, reject) => {
      http
        .get({ host: '127.0.0.1', port, path: pathname, headers: { 'Accept-Encoding': acceptEncoding } }, (res) => {
          const chunks: Buffer[] = [];
          res.on('data', (c: Buffer) => chunks.push(c));
          res.on('end', () => resolve({ headers: res.headers, body: Buffer.concat(chunks) }));
          res.on('error', reject);
        })
        .on('error', reject);
    });
  } finally {
    await new Promise((r) => server.close(r));
  }
}

it('sends the bundle brotli-compressed to a browser that accepts it, a fraction of its size, cached for a year', async () => {
  const res = await wire(BUNDLE, 'br, gzip, deflate');
  expect(res.headers['content-encoding']).toBe('br');
  expect(res.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  expect(res.headers.vary).toMatch(/Accept-Encoding/i);
  // node's own zlib decodes it back to the file, byte for byte
  expect(zlib.brotliDecompressSync(res.body).toString('utf8')).toBe(js);
  expect(res.body.length).toBeLessThan(js.length * 0.25);
  expect(res.headers['content-type']).toMatch(/^(application|text)\/javascript/);
  // the file compressed at build time at brotli's highest quality, not a quick one on the fly
  expect(res.body.equals(fs.readFileSync(path.join(dist, `${BUNDLE}.br`)))).toBe(true);
  const quick = zlib.brotliCompressSync(Buffer.from(js), { params: { [zlib.constants.BROTLI_PARAM_QUALITY]: 4 } });
  expect(res.body.length).toBeLessThan(quick.length);
});

it('sends the fonts compressed ahead too, and the service worker compressed on the fly', async () => {
  const font = await wire(FONT, 'br');
  expect(font.headers['content-encoding']).toBe('br');
  expect(font.headers['cache-control']).toBe('public, max-age=31536000, immutable');
  expect(zlib.brotliDecompressSync(font.body).equals(fs.readFileSync(path.join(dist, FONT)))).toBe(true);
  expect(fs.existsSync(path.join(dist, 'sw.js.br'))).toBe(false);
  const worker = await wire('/sw.js', 'br');
  expect(worker.headers['content-encoding']).toBe('br');
  expect(zlib.brotliDecompressSync(worker.body).equals(fs.readFileSync(path.join(dist, 'sw.js')))).toBe(true);
});

it('falls back to gzip, and to the plain file for a client that accepts neither', async () => {
  const gz = await wire(BUNDLE, 'gzip');
  expect(gz.headers['content-encoding']).toBe('gzip');
  expect(zlib.gunzipSync(gz.body).toString('utf8')).toBe(js);
  const plain = await wire(BUNDLE, 'identity');
  expect(plain.headers['content-encoding']).toBeUndefined();
  expect(plain.body.toString('utf8')).toBe(js);
});

it('answers client routes with index.html (not cached); the session answer (it carries the CSRF token) stays uncompressed', async () => {
  const page = await request(trimout.app).get('/jobs/some-job/board').set('Accept-Encoding', 'gzip').expect(200);
  expect(page.headers['cache-control']).toBe('no-cache');
  expect(page.text).toContain('<div id="root">');
  const api = await request(trimout.app).get('/api/session').set('Accept-Encoding', 'br, gzip').expect(200);
  expect(api.headers['content-encoding']).toBeUndefined();
});

describe('installable, opens offline', () => {
  interface ManifestIcon {
    src: string;
    sizes: string;
    type: string;
    purpose: string;
  }

  it('serves the web app manifest as application/manifest+json, checked on every load, with our name, colours and scope', async () => {
    const res = await request(trimout.app).get('/manifest.webmanifest').expect(200);
    expect(res.headers['content-type']).toMatch(/^application\/manifest\+json/);
    expect(res.headers['cache-control']).toBe('no-cache');
    const manifest = JSON.parse(res.text) as Record<string, unknown> & { icons: ManifestIcon[] };
    expect(manifest).toMatchObject({
      name: 'Trimout',
      short_name: 'Trimout',
      start_url: '/',
      scope: '/',
      display: 'standalone',
      theme_color: colors.spruce,
      background_color: colors.paper,
    });
    expect(manifest.icons.map((i) => `${i.sizes} ${i.purpose}`)).toEqual(['192x192 any', '512x512 any', '512x512 maskable']);
  });

  it('serves every icon the manifest lists, and the apple-touch-icon, as PNG of the stated size', async () => {
    const manifest = (await request(trimout.app).get('/manifest.webmanifest').expect(200)).body as { icons: ManifestIcon[] };
    const icons = [...manifest.icons, { src: `/${APPLE_TOUCH_ICON.file}`, sizes: '180x180', type: 'image/png', purpose: 'apple' }];
    for (const icon of icons) {
      const res = await request(trimout.app).get(icon.src).buffer(true).parse((r, done) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => done(null, Buffer.concat(chunks)));
      });
      expect(res.status).toBe(200);
      expect(res.headers['content-type']).toBe('image/png');
      const image = sharp(res.body as Buffer);
      const meta = await image.metadata();
      expect({ src: icon.src, format: meta.format, size: `${meta.width}x${meta.height}` }).toEqual({ src: icon.src, format: 'png', size: icon.sizes });
      // A launcher's mask and iOS's rounding cut into the ground colour, never into transparency.
      if (icon.purpose !== 'any') expect((await image.stats()).isOpaque).toBe(true);
    }
  });

  it('serves sw.js as JavaScript, never from an HTTP cache unchecked, precaching the shell with revisions', async () => {
    const res = await request(trimout.app).get('/sw.js').expect(200);
    expect(res.headers['content-type']).toMatch(/^(application|text)\/javascript/);
    expect(res.headers['cache-control']).toBe('no-cache');
    const index = fs.readFileSync(path.join(dist, 'index.html'));
    const md5 = (b: Buffer) => createHash('md5').update(b).digest('hex');
    // index.html by its content; the hashed bundle is its own revision
    expect(res.text).toContain(`url:"index.html",revision:"${md5(index)}"`);
    expect(res.text).toContain(`url:"${BUNDLE.slice(1)}",revision:null`);
    expect(res.text).toContain(`url:"${FONT.slice(1)}",revision:null`);
    expect(res.text).toContain(`url:"manifest.webmanifest",revision:"${md5(fs.readFileSync(path.join(dist, 'manifest.webmanifest')))}"`);
    expect(res.text).toContain(`url:"early-session.js",revision:"${md5(fs.readFileSync(path.join(dist, 'early-session.js')))}"`);
    for (const icon of ['icons/icon-192.png', 'icons/icon-512.png', 'icons/maskable-512.png', 'apple-touch-icon.png']) {
      expect(res.text).toContain(`url:"${icon}",revision:"`);
    }
    // navigations fall back to the cached app, except the API and the development mailbox
    expect(res.text).toContain('denylist:[/^\\/api(\\/|$)/,/^\\/mailbox(\\/|$)/]');
    // no runtime caching: nothing of the API is ever answered from a cache
    expect(res.text).not.toMatch(/NetworkFirst|StaleWhileRevalidate|CacheFirst/);
  });

  it('asks for the shipped fonts beside the bundle (preload links in index.html, CORS mode as fonts are fetched)', async () => {
    const res = await request(trimout.app).get('/sign-in').expect(200);
    expect(res.text).toContain(`<link rel="preload" href="${FONT}" as="font" type="font/ttf" crossorigin /></head>`);
    // named by its content, so cached for a year: the app's own request reuses the preload unasked
    const font = await request(trimout.app).get(FONT).expect(200);
    expect(font.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    // the favicon has no hash in its name: checked as usual
    const icon = await request(trimout.app).get('/favicon.ico').expect(200);
    expect(icon.headers['cache-control']).not.toMatch(/immutable/);
  });

  it('serves the early session script as JavaScript from this origin, checked on every load', async () => {
    const res = await request(trimout.app).get('/early-session.js').expect(200);
    expect(res.headers['content-type']).toMatch(/^(application|text)\/javascript/);
    expect(res.headers['cache-control']).toBe('no-cache');
    expect(res.text).toContain("fetch('/api/session'");
  });

  it("the content security policy lets this origin's worker and manifest load, and no other", async () => {
    const res = await request(trimout.app).get('/jobs/some-job').expect(200);
    const csp = String(res.headers['content-security-policy']);
    expect(csp).toMatch(/(^|;)worker-src 'self'(;|$)/);
    expect(csp).toMatch(/(^|;)manifest-src 'self'(;|$)/);
  });
});
