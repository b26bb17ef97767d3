import { PHOTO_LIMITS as uploadLimits } from '../../../server/middleware/upload';
import { MAX_PHOTOS_PER_REQUEST, PHOTO_LIMITS } from '../../../shared/rules/photos';

describe('photo limits', () => {
  it('are the numbers of security.md "Decisions already taken" (15 MB per photo, 10 files, 20 fields)', () => {
    expect(PHOTO_LIMITS.fileSize).toBe(15 * 1024 * 1024);
    expect(PHOTO_LIMITS.files).toBe(10);
    expect(PHOTO_LIMITS.fields).toBe(20);
    expect(MAX_PHOTOS_PER_REQUEST).toBe(PHOTO_LIMITS.files);
  });

  it('are what the upload middleware enforces (one object, not a copy)', () => {
    expect(uploadLimits).toBe(PHOTO_LIMITS);
  });
});
