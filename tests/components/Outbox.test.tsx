/**
 * The outbox's queue, on IndexedDB (fake-indexeddb through idb-keyval, as in the browser): order per
 * record, backoff on network trouble and 5xx, resuming a write left 'sending', 401 keeping
 * everything, a refusal needing attention without holding up the rest, one person never seeing or
 * sending another's writes, and multipart writes kept as Blobs and rebuilt byte for byte.
 */
import 'fake-indexeddb/auto';
import { ApiError, retryAfterMs } from '../../components/api/client';
import type { Write } from '../../components/api/mutations';
import { backoffMs, isQueued, MAX_RETRY_AFTER_MS, Outbox, type OutboxDeps } from '../../components/outbox/engine';
import { keepNow, setCurrentOutbox, submitWrite } from '../../components/outbox';
import { indexedDbStorage, keepWrite, memoryOutboxStorage, writeOf, type OutboxStorage } from '../../components/outbox/storage';

let dbCount = 0;
let storage: OutboxStorage;
beforeEach(() => {
  storage = indexedDbStorage(`outbox-test-${++dbCount}`);
});

function w(path: string, body: unknown = { a: 1 }, extra: Partial<Write> = {}): Write {
  return { method: 'POST', path, body, idempotencyKey: `key-${path}`, ...extra };
}

const offline = () => new ApiError(0, 'offline', 'No connection to Trimout.');

interface Fake {
  deps: OutboxDeps;
  sent: Write[];
  /** What the server does with the next write to a path: answer, or throw. */
  behave: Map<string, (write: Write) => unknown>;
  user: { id: string | null };
  clock: { now: number };
}

function fake(): Fake {
  const sent: Write[] = [];
  const behave = new Map<string, (write: Write) => unknown>();
  const user = { id: 'u1' as string | null };
  const clock = { now: 1_000_000 };
  const deps: OutboxDeps = {
    storage,
    send: async (write) => {
      const b = behave.get(write.path);
      const answer = b ? b(write) : { ok: write.path };
      sent.push(write);
      return answer;
    },
    read: async (path) => ({ data: { path, status: 'voided' }, etag: '"v7"' }),
    signedInUser: async () => user.id,
    now: () => clock.now,
    random: () => 1,
  };
  return { deps, sent, behave, user, clock };
}

const meta = (record: string | null, label = 'a write') => ({ jobId: 'j1', kind: 'finding' as const, label, record, readPath: record ? `/api/read/${record}` : null });

describe('outbox', () => {
  it('sends in order of creation and answers the server’s answer when it gets through at once', async () => {
    const f = fake();
    const box = new Outbox('u1', f.deps);
    const answer = await box.submit(w('/a'), meta('finding:1'));
    expect(answer).toEqual({ ok: '/a' });
    await box.add(w('/b'), meta('finding:1'));
    await box.add(w('/c'), meta('finding:2'));
    await box.add(w('/d'), meta('finding:1'));
    await box.sync();
    expect(f.sent.map((s) => s.path)).toEqual(['/a', '/b', '/c', '/d']);
    expect(box.snapshot().items).toEqual([]);
    expect(box.snapshot().sent.map((s) => s.label)).toHaveLength(4);
    expect(await storage.list('u1')).toEqual([]);
  });

  it('offline: the write is kept at once (Queued), with its key; later sent with the same key, once', async () => {
    const f = fake();
    f.behave.set('/a', () => {
      throw offline();
    });
    const box = new Outbox('u1', f.deps);
    const answer = await box.submit(w('/a'), meta('finding:1'));
    expect(isQueued(answer)).toBe(true);
    const [kept] = await storage.list('u1');
    expect(kept).toMatchObject({ state: 'waiting', attempts: 1, write: { idempotencyKey: 'key-/a' } });
    // backoff: 2 s for the first failure (jitter 1 → the whole of it)
    expect(kept!.notBefore).toBe(f.clock.now + 2000);
    f.behave.delete('/a');
    await box.sync(); // too early: nothing sent
    expect(f.sent).toEqual([]);
    f.clock.now += 2000;
    await box.sync();
    expect(f.sent.map((s) => s.idempotencyKey)).toEqual(['key-/a']);
    expect(await storage.list('u1')).toEqual([]);
  });

  it('backs off longer after each failure (network and 5xx), at most 5 minutes', async () => {
    expect([1, 2, 3, 4].map((n) => backoffMs(n, () => 1))).toEqual([2000, 4000, 8000, 16000]);
    expect(backoffMs(30, () => 1)).toBe(300_000);
    expect(backoffMs(1, () => 0)).toBe(1000);
    const f = fake();
    f.behave.set('/a', () => {
      throw new ApiError(503, 'unavailable', 'Down.');
    });
    const box = new Outbox('u1', f.deps);
    await box.add(w('/a'), meta(null));
    await box.sync();
    f.clock.now += 2000;
    await box.sync();
    const [kept] = await storage.list('u1');
    expect(kept).toMatchObject({ state: 'waiting', attempts: 2, notBefore: f.clock.now + 4000 });
    expect(box.snapshot().status).toBe('offline');
  });

  it('a server that asks to wait (429) leaves its words on the write until it is tried again; a plain network failure leaves none', async () => {
    const f = fake();
    f.behave.set('/a', () => {
      throw new ApiError(429, 'too_many_requests', 'Too many uploads: at most 300 in 10 minutes per person.');
    });
    const box = new Outbox('u1', f.deps);
    await box.add(w('/a'), meta(null));
    await box.sync();
    let [kept] = await storage.list('u1');
    expect(kept).toMatchObject({ state: 'waiting', attempts: 1, notBefore: f.clock.now + 2000, delay: { status: 429, message: 'Too many uploads: at most 300 in 10 minutes per person.' } });
    f.behave.set('/a', () => {
      throw offline();
    });
    f.clock.now += 2000;
    await box.sync();
    [kept] = await storage.list('u1');
    expect(kept).toMatchObject({ state: 'waiting', attempts: 2 });
    expect(kept!.delay).toBeUndefined();
  });

  it("a server's Retry-After is waited out (not the shorter backoff), up to 15 minutes", async () => {
    const f = fake();
    let wait = 120_000;
    f.behave.set('/a', () => {
      throw new ApiError(429, 'too_many_requests', 'Too many uploads.', {}, wait);
    });
    const box = new Outbox('u1', f.deps);
    await box.add(w('/a'), meta(null));
    await box.sync();
    let [kept] = await storage.list('u1');
    expect(kept).toMatchObject({ state: 'waiting', attempts: 1, notBefore: f.clock.now + 120_000 });
    // not sent before then: not by the minute timer, nor by the app's start or 'online' (forced)
    f.clock.now += 60_000;
    await box.sync();
    await box.sync(true);
    [kept] = await storage.list('u1');
    expect(kept!.attempts).toBe(1);
    // a Retry-After of a day is capped: the write is tried again within 15 minutes
    wait = 24 * 3600_000;
    f.clock.now += 60_000;
    await box.sync();
    [kept] = await storage.list('u1');
    expect(kept).toMatchObject({ attempts: 2, notBefore: f.clock.now + MAX_RETRY_AFTER_MS });
    // the person pressing "Send now" is not kept waiting
    await box.sync('asked');
    [kept] = await storage.list('u1');
    expect(kept!.attempts).toBe(3);
  });

  it('a write left "sending" by a reload is sent again on start with the same key', async () => {
    const f = fake();
    const first = new Outbox('u1', f.deps);
    const item = await first.add(w('/a'), meta(null));
    await storage.put({ ...item, state: 'sending', attempts: 1 });
    first.stop();
    const after = new Outbox('u1', f.deps);
    await after.load();
    expect(after.snapshot().items.map((i) => i.state)).toEqual(['waiting']);
    await after.sync();
    expect(f.sent.map((s) => s.idempotencyKey)).toEqual(['key-/a']);
  });

  it('a refusal needs attention with the server’s answer and what it holds now; only that record waits behind it', async () => {
    const f = fake();
    const box = new Outbox('u1', f.deps);
    await box.add(w('/fix', { note: 'done' }, { ifMatch: '"v3"' }), meta('finding:1', 'Fix on #12'));
    await box.add(w('/pin'), meta('finding:1', 'Pin on #12'));
    await box.add(w('/check'), meta('unit:9', 'Unit check'));
    f.behave.set('/fix', () => {
      throw new ApiError(409, 'finding_voided', 'This finding was voided.');
    });
    await box.sync();
    expect(f.sent.map((s) => s.path)).toEqual(['/check']);
    const [fix, pin] = box.snapshot().items;
    expect(fix).toMatchObject({
      state: 'attention',
      refusal: { status: 409, id: 'finding_voided', message: 'This finding was voided.' },
      serverNow: { data: { path: '/api/read/finding:1', status: 'voided' }, etag: '"v7"' },
    });
    expect(pin).toMatchObject({ state: 'waiting', attempts: 0 });
    // Apply again on the new version: If-Match from the record as it is now, same key.
    f.behave.delete('/fix');
    await box.applyAgain(fix!.id);
    expect(f.sent.slice(1).map((s) => [s.path, s.ifMatch ?? null, s.idempotencyKey])).toEqual([
      ['/fix', '"v7"', 'key-/fix'],
      ['/pin', null, 'key-/pin'],
    ]);
    expect(box.snapshot().items).toEqual([]);
  });

  it('discarding a write that needs attention lets its record go on', async () => {
    const f = fake();
    const box = new Outbox('u1', f.deps);
    f.behave.set('/a', () => {
      throw new ApiError(404, 'not_found', 'Finding not found.');
    });
    await box.add(w('/a'), meta('finding:1'));
    await box.add(w('/b'), meta('finding:1'));
    await box.sync();
    expect(box.snapshot().items[0]).toMatchObject({ state: 'attention', refusal: { status: 404 } });
    await box.discard(box.snapshot().items[0]!.id);
    await box.sync();
    expect(f.sent.map((s) => s.path)).toEqual(['/b']);
  });

  it('a refusal of a write submitted from a form goes back to the form and is not kept', async () => {
    const f = fake();
    f.behave.set('/a', () => {
      throw new ApiError(400, 'bad_request', 'note: too long', { note: 'too long' });
    });
    const box = new Outbox('u1', f.deps);
    await expect(box.submit(w('/a'), meta(null))).rejects.toMatchObject({ status: 400, fields: { note: 'too long' } });
    expect(await storage.list('u1')).toEqual([]);
  });

  it('401: everything is kept and nothing more is sent until the same person is signed in again', async () => {
    const f = fake();
    const box = new Outbox('u1', f.deps);
    f.behave.set('/a', () => {
      throw new ApiError(401, 'unauthenticated', 'Sign in.');
    });
    await box.add(w('/a'), meta(null));
    await box.add(w('/b'), meta(null));
    await box.sync();
    expect(box.snapshot().status).toBe('signed-out');
    expect((await storage.list('u1')).map((i) => i.state)).toEqual(['waiting', 'waiting']);
    f.behave.delete('/a');
    // Someone else signs in on the phone: nothing of u1 goes out with their session.
    f.user.id = 'u2';
    await box.sync(true);
    expect(f.sent).toEqual([]);
    f.user.id = 'u1';
    await box.sync(true);
    expect(f.sent.map((s) => s.path)).toEqual(['/a', '/b']);
  });

  it('one person’s writes are never listed or sent for another on the same phone', async () => {
    const f = fake();
    const mine = new Outbox('u1', f.deps);
    await mine.add(w('/mine'), meta(null));
    mine.stop();
    f.user.id = 'u2';
    const theirs = new Outbox('u2', f.deps);
    await theirs.load();
    expect(theirs.snapshot().items).toEqual([]);
    await theirs.add(w('/theirs'), meta(null));
    await theirs.sync(true);
    expect(f.sent.map((s) => s.path)).toEqual(['/theirs']);
    expect((await storage.list('u1')).map((i) => i.write.path)).toEqual(['/mine']);
    await theirs.discardAll();
    expect((await storage.list('u1')).map((i) => i.write.path)).toEqual(['/mine']);
  });

  it('keeps a multipart write as its fields and Blobs and rebuilds the same form', async () => {
    const form = new FormData();
    form.append('data', JSON.stringify({ id: 'f1', note: 'drain' }));
    form.append('photos', new Blob([new Uint8Array([1, 2, 3, 4])], { type: 'image/jpeg' }), 'a.jpg');
    form.append('photos', new Blob([new Uint8Array([9, 8])], { type: 'image/png' }), 'b.png');
    const kept = keepWrite({ method: 'POST', path: '/f', body: form, idempotencyKey: 'k-1' });
    expect(kept.body.kind).toBe('form');
    // (fake-indexeddb clones Blobs into another realm than the test's FormData: memory here; the
    // browser test sends photos kept in the real IndexedDB and compares their SHA-256.)
    const f = fake();
    f.deps.storage = memoryOutboxStorage();
    const box = new Outbox('u1', f.deps);
    const item = await box.add({ method: 'POST', path: '/f', body: form, idempotencyKey: 'k-1' }, meta(null));
    expect(item.bytes).toBe(6);
    const stored = await f.deps.storage.get(item.id);
    const again = writeOf(stored!.write).body as FormData;
    expect(again.get('data')).toBe(JSON.stringify({ id: 'f1', note: 'drain' }));
    const photos = again.getAll('photos') as File[];
    expect(photos.map((p) => [p.name, p.type, p.size])).toEqual([
      ['a.jpg', 'image/jpeg', 4],
      ['b.png', 'image/png', 2],
    ]);
    expect([...new Uint8Array(await photos[0]!.arrayBuffer())]).toEqual([1, 2, 3, 4]);
  });

  it('a write kept at the press is on the device before it is handed on, and sent once, not kept twice', async () => {
    const f = fake();
    f.behave.set('/k', () => {
      throw offline();
    });
    const box = new Outbox('u1', f.deps);
    await box.load();
    setCurrentOutbox(box);
    try {
      const write = w('/k');
      // The record is handed to IndexedDB in the same turn as the press (no await before the put).
      let put = 0;
      const realPut = storage.put;
      storage.put = (item) => {
        put += 1;
        return realPut(item);
      };
      const first = keepNow(write, 'unit IU-1');
      expect(put).toBe(1);
      // A second press while it is being kept keeps nothing more.
      await Promise.all([first, keepNow(write, 'unit IU-1')]);
      expect(put).toBe(1);
      expect((await storage.list('u1')).map((i) => [i.write.idempotencyKey, i.label])).toEqual([['key-/k', 'unit IU-1']]);
      const answer = await submitWrite(write);
      expect(isQueued(answer)).toBe(true);
      expect((await storage.list('u1')).map((i) => i.write.idempotencyKey)).toEqual(['key-/k']);
      f.behave.delete('/k');
      await box.sync(true);
      expect(f.sent.map((s) => s.idempotencyKey)).toEqual(['key-/k']);
      expect(await storage.list('u1')).toEqual([]);
    } finally {
      setCurrentOutbox(null);
    }
  });

  it('a write kept at the press and sent by a pass before its form hands it on gets the server’s answer', async () => {
    const f = fake();
    const box = new Outbox('u1', f.deps);
    setCurrentOutbox(box);
    try {
      const write = w('/early');
      await keepNow(write);
      await box.sync(true);
      expect(f.sent.map((s) => s.path)).toEqual(['/early']);
      expect(await submitWrite(write)).toEqual({ ok: '/early' });
      expect(f.sent).toHaveLength(1);
    } finally {
      setCurrentOutbox(null);
    }
  });
});

describe('Retry-After as the server writes it', () => {
  // RFC 9110 §10.2.3 gives both forms: "Retry-After: Fri, 31 Dec 1999 23:59:59 GMT" and "Retry-After: 120".
  it('reads delay-seconds and an HTTP date, and nothing else', () => {
    expect(retryAfterMs('120')).toBe(120_000);
    const now = Date.parse('Fri, 31 Dec 1999 23:58:59 GMT');
    expect(retryAfterMs('Fri, 31 Dec 1999 23:59:59 GMT', now)).toBe(60_000);
    expect(retryAfterMs('Fri, 31 Dec 1999 23:57:59 GMT', now)).toBe(0); // a date gone by: at once
    expect(retryAfterMs(null)).toBeUndefined();
    expect(retryAfterMs('soon')).toBeUndefined();
  });
});
