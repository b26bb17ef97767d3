/**
 * Photos on the device: when a photo is made smaller (long side over 2560 px, to exactly 2560,
 * the other side in proportion; a small photo kept as it was), and when the device is too full
 * to take a new one (under 50 MB free or over 95% of the quota: refused with a message, nothing
 * already kept is touched).
 */
import { askForPersistentStorage, resetPersistentStorageAsk, roomVerdict } from '../../components/photos/deviceStorage';
import { downscalePlan, jpegName, MAX_LONG_SIDE } from '../../components/photos/downscale';
import { preparePhotos } from '../../components/photos/prepare';

const MB = 1024 * 1024;

describe('downscalePlan', () => {
  it.each([
    [{ width: 4000, height: 3000 }, { action: 'resize', width: 2560, height: 1920 }],
    [{ width: 3000, height: 4000 }, { action: 'resize', width: 1920, height: 2560 }],
    [{ width: 4032, height: 3024 }, { action: 'resize', width: 2560, height: 1920 }],
    [{ width: 8000, height: 1000 }, { action: 'resize', width: 2560, height: 320 }],
    [{ width: 2561, height: 2561 }, { action: 'resize', width: 2560, height: 2560 }],
    [{ width: 2560, height: 1920 }, { action: 'keep' }],
    [{ width: 1200, height: 1600 }, { action: 'keep' }],
    [{ width: 0, height: 0 }, { action: 'keep' }],
  ])('%j → %j', (size, plan) => {
    expect(downscalePlan(size)).toEqual(plan);
  });

  it('keeps the limit at 2560 px', () => {
    expect(MAX_LONG_SIDE).toBe(2560);
  });

  it('names the JPEG after the original', () => {
    expect(jpegName('IMG_0412.HEIC')).toBe('IMG_0412.jpg');
    expect(jpegName('drain.png')).toBe('drain.jpg');
    expect(jpegName('photo')).toBe('photo.jpg');
  });
});

describe('roomVerdict', () => {
  it.each([
    ['unknown figures', null, 0, true],
    ['plenty of room', { usage: 100 * MB, quota: 2000 * MB }, 5 * MB, true],
    ['under 50 MB left after the photo', { usage: 1950 * MB, quota: 2000 * MB }, 1 * MB, false],
    ['over 95% used', { usage: 9600 * MB, quota: 10000 * MB }, 0, false],
    ['just under both limits', { usage: 900 * MB, quota: 1000 * MB }, 0, true],
  ])('%s', (_name, figures, incoming, ok) => {
    const v = roomVerdict(figures, incoming);
    expect(v.ok).toBe(ok);
    if (!v.ok) expect(v.message).toMatch(/nearly out of room.*Nothing already on the phone was removed/);
  });
});

describe('preparePhotos', () => {
  const nav = globalThis as { navigator?: { storage?: unknown } };
  const saved = nav.navigator?.storage;
  afterEach(() => {
    if (nav.navigator) nav.navigator.storage = saved;
    resetPersistentStorageAsk();
  });

  function device(usage: number, quota: number) {
    const persist = jest.fn(async () => true);
    nav.navigator ??= {} as { storage?: unknown };
    nav.navigator.storage = { estimate: async () => ({ usage, quota }), persist, persisted: async () => false };
    return persist;
  }
  const photo = { key: 'p1', name: 'a.jpg', type: 'image/jpeg', uri: 'file:///a.jpg', blob: { size: 900_000 } as Blob };

  it('refuses a new photo when the device is nearly full, and says why', async () => {
    const persist = device(1990 * MB, 2000 * MB);
    const out = await preparePhotos([photo]);
    expect(out.photos).toEqual([]);
    expect(out.refused).toMatch(/^This phone is nearly out of room for Trimout \(10 MB free\), so this photo was not kept\./);
    expect(persist).not.toHaveBeenCalled();
  });

  it('takes it when there is room, and asks once for persistent storage', async () => {
    const persist = device(100 * MB, 2000 * MB);
    const out = await preparePhotos([photo]);
    // No image decoder here: the photo goes as it was (the server decodes every format it takes).
    expect(out).toEqual({ photos: [photo], refused: null });
    await preparePhotos([photo]);
    await askForPersistentStorage();
    expect(persist).toHaveBeenCalledTimes(1);
  });
});
