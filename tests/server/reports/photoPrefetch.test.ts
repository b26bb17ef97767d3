/**
 * The close-out report's photo prefetch: photos are read and downsized a window ahead of the page
 * being drawn, counting only findings that have a photo, and the window runs on into rows added
 * later (the next batch), so sharp keeps working while a page without photos is laid out.
 */
import { PhotoPrefetch, type PhotoRequest } from '../../../server/reports/photos';
import type { ObjectStore } from '../../../server/storage';

/** A store with nothing in it that records which keys were asked for, in order. */
function emptyStore(): ObjectStore & { asked: string[] } {
  const asked: string[] = [];
  return {
    location: 'memory',
    asked,
    put: async () => undefined,
    delete: async () => undefined,
    exists: async () => false,
    get: async (key: string) => {
      asked.push(key);
      return null;
    },
  } as unknown as ObjectStore & { asked: string[] };
}

const box = { width: 100, height: 75 };
/** A finding's three requests, with a photo as found only ("" = no photo). */
const finding = (key: string): PhotoRequest[] => [
  { key, box },
  { key: '', box },
  { key: '', box },
];

describe('PhotoPrefetch', () => {
  it('reads `ahead` photos beyond the one taken, skipping requests without a photo', async () => {
    const store = emptyStore();
    const prefetch = new PhotoPrefetch(store, ['a', 'b', 'c', 'd', 'e', 'f', 'g'].flatMap(finding), 4);
    expect(await prefetch.take(0)).toBeNull();
    // The taken one and four more, although they lie twelve requests further on.
    expect(store.asked).toEqual(['a', 'b', 'c', 'd', 'e']);
    expect(await prefetch.take(1)).toBeNull();
    expect(await prefetch.take(2)).toBeNull();
    expect(store.asked).toEqual(['a', 'b', 'c', 'd', 'e']);
    await prefetch.take(3);
    expect(store.asked).toEqual(['a', 'b', 'c', 'd', 'e', 'f']);
  });

  it('runs on into requests added later, taken by the index `add` returned', async () => {
    const store = emptyStore();
    const prefetch = new PhotoPrefetch(store, [], 3);
    const first = prefetch.add([...finding('a'), ...finding('b')]);
    const second = prefetch.add([...finding('c'), ...finding('d'), ...finding('e')]);
    expect([first, second]).toEqual([0, 6]);
    await prefetch.take(first);
    // The window reaches into the second batch before the first is drawn.
    expect(store.asked).toEqual(['a', 'b', 'c', 'd']);
    await prefetch.take(first + 3);
    await prefetch.take(second);
    expect(store.asked).toEqual(['a', 'b', 'c', 'd', 'e']);
    // Each key is read once.
    await prefetch.take(second + 3);
    await prefetch.take(second + 6);
    expect(store.asked).toEqual(['a', 'b', 'c', 'd', 'e']);
  });
});
