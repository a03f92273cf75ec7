/** The in-memory store of summaries keyed by a trial's data version (server/db/trial-versions.ts). */
import { describe, expect, it } from 'vitest';
import { VersionedCache } from '../../server/db/trial-versions.js';

describe('VersionedCache', () => {
  it('when asked with another version than the one stored, then it misses', () => {
    const cache = new VersionedCache<string>(10);
    cache.set('trial', 3, 'at three');
    expect(cache.get('trial', 3)).toBe('at three');
    expect(cache.get('trial', 4)).toBeUndefined();
    expect(cache.get('trial', 2)).toBeUndefined();
  });

  it('when a slower request stores what it computed at an older version, then the newer summary stays', () => {
    const cache = new VersionedCache<string>(10);
    cache.set('trial', 5, 'at five');
    cache.set('trial', 4, 'at four');
    expect(cache.get('trial', 5)).toBe('at five');
    expect(cache.get('trial', 4)).toBeUndefined();
  });

  it('when it is full, then the entry stored longest ago goes first', () => {
    const cache = new VersionedCache<number>(2);
    cache.set('a', 1, 1);
    cache.set('b', 1, 2);
    cache.set('a', 2, 3);
    cache.set('c', 1, 4);
    expect(cache.get('b', 1)).toBeUndefined();
    expect(cache.get('a', 2)).toBe(3);
    expect(cache.get('c', 1)).toBe(4);
  });
});
