/**
 * A half-filled finding's photos in IndexedDB (fake-indexeddb here), through the same wrapper as
 * the outbox: kept under the draft's key, read back in order, forgotten; photos kept by the
 * earlier hand-written code (same database and store) are still read.
 */
import 'fake-indexeddb/auto';
import { dropPhotos, keepPhotos, keptPhotos } from '../../components/drafts/photoBlobs';

const photo = (key: string) => ({ key, name: `${key}.jpg`, type: 'image/jpeg', blob: new Blob([new Uint8Array([1, 2, 3])], { type: 'image/jpeg' }) });

describe('draft photos', () => {
  it('reads photos kept by the earlier code (database trimout-drafts, version 1, store photos)', async () => {
    // Written the way the hand-written IndexedDB code wrote it, before the wrapper first opens the database.
    await new Promise<void>((resolve, reject) => {
      const open = indexedDB.open('trimout-drafts', 1);
      open.onupgradeneeded = () => open.result.createObjectStore('photos');
      open.onerror = () => reject(open.error);
      open.onsuccess = () => {
        const tx = open.result.transaction('photos', 'readwrite');
        tx.objectStore('photos').put([photo('old')], 'trimout:v1:finding:u1:j1:unit1:i1');
        tx.oncomplete = () => {
          open.result.close();
          resolve();
        };
        tx.onerror = () => reject(tx.error);
      };
    });
    expect((await keptPhotos('trimout:v1:finding:u1:j1:unit1:i1')).map((p) => p.key)).toEqual(['old']);
  });

  it('keeps, reads back and forgets the photos of one draft', async () => {
    await keepPhotos('trimout:v1:finding:u1:j1:unit9:i1', [photo('a'), photo('b')]);
    await keepPhotos('trimout:v1:finding:u2:j1:unit9:i1', [photo('c')]);
    expect((await keptPhotos('trimout:v1:finding:u1:j1:unit9:i1')).map((p) => [p.key, p.name, p.type])).toEqual([
      ['a', 'a.jpg', 'image/jpeg'],
      ['b', 'b.jpg', 'image/jpeg'],
    ]);
    await keepPhotos('trimout:v1:finding:u1:j1:unit9:i1', []);
    expect(await keptPhotos('trimout:v1:finding:u1:j1:unit9:i1')).toEqual([]);
    expect((await keptPhotos('trimout:v1:finding:u2:j1:unit9:i1')).map((p) => p.key)).toEqual(['c']);
    await dropPhotos('trimout:v1:finding:u2:j1:unit9:i1');
    expect(await keptPhotos('trimout:v1:finding:u2:j1:unit9:i1')).toEqual([]);
  });
});
