import { versionTag } from '../../../components/api/lists';
import { etagOf as serverEtag } from '../../../server/services/versioning';
import { etagOf } from '../../../shared/rules/etag';

describe('etagOf', () => {
  it.each([
    [1, '"v1"'],
    [42, '"v42"'],
  ])('version %i is the strong tag %s (RFC 9110 §8.8.3: quoted opaque string)', (version, tag) => {
    expect(etagOf(version)).toBe(tag);
  });

  it('is the one rule: the server ETag and the If-Match the screens send are the same text', () => {
    for (const v of [1, 2, 17, 100000]) {
      expect(serverEtag(v)).toBe(etagOf(v));
      expect(versionTag(v)).toBe(etagOf(v));
    }
  });
});
