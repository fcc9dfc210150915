/**
 * The map traced from a rig is kept between runs (issue 16): a file per map, keyed by what shapes it,
 * verified before use; a damaged or foreign file is rebuilt, never used.
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { RemapMap } from '@skyfold/warp-core';
import { MAP_CACHE_KEEP, cachedMap, mapCacheDir, mapCacheKey, readCachedMap, writeCachedMap } from '../src/warp/map-cache.js';
import { loadMapSource } from '../src/warp/map-source.js';

let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-map-cache-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function smallMap(seed: number): RemapMap {
  const w = 5;
  const h = 3;
  const f = (o: number) => Float32Array.from({ length: w * h }, (_, k) => (k % 4 === 0 ? Number.NaN : k * 1.25 + seed + o));
  return { width: w, height: h, x: f(0), y: f(100), gain: f(200) };
}

const same = (a: RemapMap, b: RemapMap) =>
  a.width === b.width && a.height === b.height && (['x', 'y', 'gain'] as const).every((c) => a[c].every((v, k) => Object.is(v, b[c][k])));

describe('map cache files', () => {
  it('give back exactly the map stored under the same key', () => {
    const d = join(dir, 'round-trip');
    const key = mapCacheKey('rig:a', [64, 64], { feather: 1 });
    expect(writeCachedMap(d, key, smallMap(1))).toBe(true);
    const back = readCachedMap(d, key)!;
    expect(back).toBeDefined();
    expect(same(back, smallMap(1))).toBe(true);
  });

  it('are not used for another key, a damaged body or a truncated file', () => {
    const d = join(dir, 'damaged');
    const key = mapCacheKey('rig:a', [64, 64], {});
    writeCachedMap(d, key, smallMap(2));
    expect(readCachedMap(d, mapCacheKey('rig:a', [64, 32], {}))).toBeUndefined();
    const [file] = readdirSync(d).filter((f) => f.endsWith('.map'));
    const bytes = readFileSync(join(d, file));
    const flipped = Buffer.from(bytes);
    flipped[flipped.length - 5] ^= 0x40;
    writeFileSync(join(d, file), flipped);
    expect(readCachedMap(d, key)).toBeUndefined();
    writeFileSync(join(d, file), bytes.subarray(0, bytes.length - 4));
    expect(readCachedMap(d, key)).toBeUndefined();
    // cachedMap rebuilds and replaces it
    let built = 0;
    const m = cachedMap(d, key, () => (built++, smallMap(2)));
    expect(built).toBe(1);
    expect(same(m, smallMap(2))).toBe(true);
    expect(same(readCachedMap(d, key)!, smallMap(2))).toBe(true);
    cachedMap(d, key, () => (built++, smallMap(2)));
    expect(built).toBe(1);
  });

  it('keys differ with the geometry, the source size and each setting', () => {
    const base = mapCacheKey('rig:a', [64, 64], { feather: 1, flip: false });
    expect(mapCacheKey('rig:b', [64, 64], { feather: 1, flip: false })).not.toBe(base);
    expect(mapCacheKey('rig:a', [64, 65], { feather: 1, flip: false })).not.toBe(base);
    expect(mapCacheKey('rig:a', [64, 64], { feather: 2, flip: false })).not.toBe(base);
    expect(mapCacheKey('rig:a', [64, 64], { feather: 1, flip: true })).not.toBe(base);
    expect(mapCacheKey('rig:a', [64, 64], { feather: 1, flip: false })).toBe(base);
  });

  it(`keep the ${MAP_CACHE_KEEP} most recently written`, () => {
    const d = join(dir, 'trim');
    for (let i = 0; i < MAP_CACHE_KEEP + 3; i++) {
      writeCachedMap(d, mapCacheKey(`rig:${i}`, [8, 8], {}), smallMap(i));
      // distinct, increasing times whatever the file system's resolution
      for (const f of readdirSync(d)) if (!f.startsWith('.')) utimesSync(join(d, f), new Date(), new Date(Date.now() - 1e6 + i * 1000));
    }
    expect(readdirSync(d).filter((f) => f.endsWith('.map')).length).toBe(MAP_CACHE_KEEP);
  });

  it('live in $SKYFOLD_MAP_CACHE, "off" turns them off, else under the XDG cache folder', () => {
    expect(mapCacheDir({ SKYFOLD_MAP_CACHE: '/x/y' })).toBe('/x/y');
    expect(mapCacheDir({ SKYFOLD_MAP_CACHE: 'off' })).toBeUndefined();
    expect(mapCacheDir({ XDG_CACHE_HOME: '/c' })).toBe(join('/c', 'skyfold', 'maps'));
  });
});

describe('a rig map source with a cache folder', () => {
  it('traces once, then reads the same map back; other settings trace anew', async () => {
    const d = join(dir, 'rig');
    const text = readFileSync(new URL('../../../fixtures/demo-rig.yaml', import.meta.url), 'utf8');
    const rigPath = join(dir, 'rig.yaml');
    writeFileSync(rigPath, text.replace(/resolution:\s*\[\s*\d+\s*,\s*\d+\s*\]/, 'resolution: [96, 60]'));
    const fresh = (await loadMapSource(rigPath, undefined)).build([256, 256], {});
    const first = (await loadMapSource(rigPath, d)).build([256, 256], {});
    expect(readdirSync(d).filter((f) => f.endsWith('.map')).length).toBe(1);
    const second = (await loadMapSource(rigPath, d)).build([256, 256], {});
    expect(same(first, fresh)).toBe(true);
    expect(same(second, fresh)).toBe(true);
    // the second run really reads the file: a (validly written) changed map there comes back
    const [file] = readdirSync(d).filter((f) => f.endsWith('.map'));
    const bytes = readFileSync(join(d, file));
    const key = JSON.parse(bytes.subarray(0, bytes.indexOf(10)).toString('utf8')).key;
    const planted = readCachedMap(d, key)!;
    planted.gain[planted.gain.findIndex((g) => g > 0)] = 0.125;
    writeCachedMap(d, key, planted);
    expect(same((await loadMapSource(rigPath, d)).build([256, 256], {}), planted)).toBe(true);
    expect(same(planted, fresh)).toBe(false);
    const flipped = (await loadMapSource(rigPath, d)).build([256, 256], { flip: true });
    expect(same(flipped, fresh)).toBe(false);
    expect(readdirSync(d).filter((f) => f.endsWith('.map')).length).toBe(2);
  });
});
