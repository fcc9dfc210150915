/**
 * The per-pixel map traced from a rig, kept between runs: building it traces the frame several
 * times, and every run and every farm shard would otherwise redo it. One file per map in a cache
 * folder, named by a hash of everything that shapes the map (the rig, the source size, the map
 * settings, the skyfold version), holding its own key and a SHA-256 of its arrays, both checked
 * before use; a file that fails either is ignored and rebuilt. The folder is only a cache: removing
 * it, or any file in it, loses nothing.
 */
import { createHash } from 'node:crypto';
import { readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { homedir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { RemapMap } from '@skyfold/warp-core';
import { writeFileAtomic } from '../io/output-file.js';
import { VERSION } from '../version.js';

/** Bumped whenever the file layout or the way maps are built changes, so old files are not used. */
export const MAP_CACHE_FORMAT = 1;
/** Files kept in the folder; the least recently written beyond this are removed. */
export const MAP_CACHE_KEEP = 8;
const MAGIC = 'skyfold-map';

/**
 * The cache folder: $SKYFOLD_MAP_CACHE when set ("off" turns the cache off), else skyfold/maps under
 * $XDG_CACHE_HOME or ~/.cache (the XDG Base Directory Specification's default cache location).
 */
export function mapCacheDir(env: Record<string, string | undefined>): string | undefined {
  const set = env.SKYFOLD_MAP_CACHE;
  if (set === 'off') return undefined;
  if (set) return set;
  const base = env.XDG_CACHE_HOME || join(env.HOME || homedir(), '.cache');
  return join(base, 'skyfold', 'maps');
}

let coreBuild: string | undefined;
/**
 * A SHA-256 of warp-core's built code (every .js file of the package), so that a map traced by
 * other code, even under the same version number (a development build), is never taken for this one.
 */
export function coreFingerprint(): string {
  if (coreBuild === undefined) {
    const h = createHash('sha256');
    const walk = (dir: string) => {
      for (const e of readdirSync(dir, { withFileTypes: true }).sort((a, b) => (a.name < b.name ? -1 : 1))) {
        const p = join(dir, e.name);
        if (e.isDirectory()) walk(p);
        else if (e.name.endsWith('.js')) h.update(e.name).update(readFileSync(p));
      }
    };
    walk(dirname(fileURLToPath(import.meta.resolve('@skyfold/warp-core'))));
    coreBuild = h.digest('hex');
  }
  return coreBuild;
}

/** The stable key of a map: what it was built from, and by which code, in one string. */
export function mapCacheKey(geometry: string, size: [number, number], settings: object): string {
  return JSON.stringify({ format: MAP_CACHE_FORMAT, version: VERSION, core: coreFingerprint(), geometry, size, settings });
}

function fileOf(dir: string, key: string): string {
  return join(dir, createHash('sha256').update(key).digest('hex').slice(0, 40) + '.map');
}

function digest(parts: Uint8Array[]): string {
  const h = createHash('sha256');
  for (const p of parts) h.update(p);
  return h.digest('hex');
}

const bytesOf = (a: Float32Array) => new Uint8Array(a.buffer, a.byteOffset, a.byteLength);

/** The cached map for `key`, or undefined when there is none or the file does not verify. */
export function readCachedMap(dir: string, key: string): RemapMap | undefined {
  let buf: Buffer;
  try {
    buf = readFileSync(fileOf(dir, key));
  } catch {
    return undefined;
  }
  const nl = buf.indexOf(10);
  if (nl < 0) return undefined;
  let head: { magic?: string; key?: string; width?: number; height?: number; sha256?: string };
  try {
    head = JSON.parse(buf.subarray(0, nl).toString('utf8'));
  } catch {
    return undefined;
  }
  const { width, height } = head;
  if (head.magic !== MAGIC || head.key !== key || !Number.isInteger(width) || !Number.isInteger(height)) return undefined;
  const n = width! * height!;
  const body = buf.subarray(nl + 1);
  if (body.length !== 3 * 4 * n) return undefined;
  // copied out, so the arrays are aligned and own their memory
  const all = new Float32Array(3 * n);
  bytesOf(all).set(body);
  if (digest([bytesOf(all)]) !== head.sha256) return undefined;
  return { width: width!, height: height!, x: all.subarray(0, n), y: all.subarray(n, 2 * n), gain: all.subarray(2 * n) };
}

/**
 * Stores `map` under `key`, atomically, then trims the folder to MAP_CACHE_KEEP files. A cache that
 * cannot be written is not an error (the run goes on without it): returns false then.
 */
export function writeCachedMap(dir: string, key: string, map: RemapMap): boolean {
  const parts = [bytesOf(map.x), bytesOf(map.y), bytesOf(map.gain)];
  const head = JSON.stringify({ magic: MAGIC, key, width: map.width, height: map.height, sha256: digest(parts) }) + '\n';
  const file = fileOf(dir, key);
  try {
    writeFileAtomic(file, Buffer.concat([Buffer.from(head, 'utf8'), ...parts]));
  } catch {
    return false;
  }
  try {
    const maps = readdirSync(dir)
      .filter((f) => f.endsWith('.map'))
      .map((f) => ({ f, t: statSync(join(dir, f)).mtimeMs }))
      .sort((a, b) => b.t - a.t);
    for (const { f } of maps.slice(MAP_CACHE_KEEP)) rmSync(join(dir, f), { force: true });
  } catch {
    // another run trimming at the same time: nothing lost
  }
  return true;
}

/** `build()`'s map through the cache in `dir` (none: always built). */
export function cachedMap(dir: string | undefined, key: string, build: () => RemapMap): RemapMap {
  if (!dir) return build();
  const hit = readCachedMap(dir, key);
  if (hit) return hit;
  const map = build();
  writeCachedMap(dir, key, map);
  return map;
}
