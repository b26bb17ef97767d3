/**
 * Serving the exported web app: compressed on the wire (brotli, else gzip, as the browser says it
 * accepts), hashed bundles cached for a year, client routes answered with index.html. A cold start
 * on a slow phone connection is mostly the bundle's bytes.
 */
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import request from 'supertest';
import type { TrimoutApp } from '../../../server/app';
import type { Database } from '../../../server/db';
import { buildTestApp, testEnv } from '../../support/app';
import { connectTestDb } from '../../support/db';

let db: Database;
let trimout: TrimoutApp;
let dist: string;
const BUNDLE = '/_expo/static/js/web/entry-0123456789abcdef.js';
// Text shaped like a bundle: repetitive identifiers, as minified JavaScript is.
const js = Array.from({ length: 4000 }, (_, i) => `function c${i}(a,b){return a.map(function(x){return x+b*${i % 97}})};`).join('\n');

beforeAll(async () => {
  dist = fs.mkdtempSync(path.join(os.tmpdir(), 'trimout-dist-'));
  fs.mkdirSync(path.join(dist, path.dirname(BUNDLE)), { recursive: true });
  fs.writeFileSync(path.join(dist, BUNDLE), js);
  fs.writeFileSync(path.join(dist, 'index.html'), `<!doctype html><html><body><div id="root"></div><script src="${BUNDLE}" defer></script></body></html>`);
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
});

it('falls back to gzip, and to the plain file for a client that accepts neither', async () => {
  const gz = await wire(BUNDLE, 'gzip');
  expect(gz.headers['content-encoding']).toBe('gzip');
  expect(zlib.gunzipSync(gz.body).toString('utf8')).toBe(js);
  const plain = await wire(BUNDLE, 'identity');
  expect(plain.headers['content-encoding']).toBeUndefined();
  expect(plain.body.toString('utf8')).toBe(js);
});

it('answers client routes with index.html (not cached), and leaves API answers uncompressed', async () => {
  const page = await request(trimout.app).get('/jobs/some-job/board').set('Accept-Encoding', 'gzip').expect(200);
  expect(page.headers['cache-control']).toBe('no-cache');
  expect(page.text).toContain('<div id="root">');
  const api = await request(trimout.app).get('/api/session').set('Accept-Encoding', 'br, gzip').expect(200);
  expect(api.headers['content-encoding']).toBeUndefined();
});
