/** Where a warp's map comes from: an exact per-pixel trace of a rig, or a baked mesh (.glb). */
import { createHash } from 'node:crypto';
import { BAKE_DEFAULTS, pixelMapFromMesh, pixelMapFromRig, rigToDocument, type RemapMap, type SourceOrientation, type WarpMesh, type Rig } from '@skyfold/warp-core';
import { readBinaryFile, readRig } from '../io/document-file.js';
import { UserError } from '../errors.js';
import { readGlb } from '../export/glb.js';
import { cachedMap, mapCacheDir, mapCacheKey } from './map-cache.js';
import { runContext } from '../io/run-context.js';

export interface MapSettings extends SourceOrientation {
  brightness?: number;
  brightnessFloor?: number;
  feather?: number;
  /** Warp frames that are not square (u across the width, v down the height) instead of refusing them. */
  nonSquare?: boolean;
}

/**
 * A dome master is square, its fisheye circle touching all four sides (docs/design.md, fisheye
 * convention; the draft Dome Master Show File Format, Sec. II); a frame of another shape is refused
 * with the reason unless asked for.
 */
export function checkSquare(size: readonly [number, number], s: MapSettings): void {
  if (size[0] === size[1] || s.nonSquare) return;
  throw new UserError(
    `the frames are ${size[0]}x${size[1]}, not square: a dome master is square, its fisheye circle touching all four sides; pass --non-square to warp them anyway (the circle stretched over the whole frame)`,
  );
}

export interface MapSource {
  kind: 'rig' | 'mesh';
  /** Projector resolution. */
  width: number;
  height: number;
  /** Stable text naming the geometry, for the run log. */
  key: string;
  rig?: Rig;
  mesh?: WarpMesh;
  build(size: [number, number], s: MapSettings): RemapMap;
}

const bytesOf = (a: Float64Array | Uint32Array) => new Uint8Array(a.buffer, a.byteOffset, a.byteLength);

/** `cacheDir`: where maps traced from a rig are kept between runs (undefined: not kept); see map-cache.ts. */
export async function loadMapSource(path: string, cacheDir: string | undefined = mapCacheDir(runContext().env)): Promise<MapSource> {
  if (path.toLowerCase().endsWith('.glb')) {
    const bytes = readBinaryFile(path, 'mesh');
    let mesh: WarpMesh;
    try {
      mesh = await readGlb(bytes);
    } catch (e) {
      throw new UserError(`${path}: not a skyfold warp mesh: ${(e as Error).message.split('\n')[0]}`);
    }
    const key = 'mesh:' + createHash('sha256').update(bytes).digest('hex');
    return {
      kind: 'mesh',
      width: mesh.width,
      height: mesh.height,
      key,
      mesh,
      build(size, s) {
        checkSquare(size, s);
        const map = pixelMapFromMesh(mesh, size, s);
        if (s.brightness === 0) {
          // compensation off: keep only the mask, which the mesh carries separately
          const m = pixelMapFromMesh({ ...mesh, brightness: new Float32Array(mesh.brightness.length).fill(1) }, size, s);
          return m;
        }
        return map;
      },
    };
  }
  const rig = readRig(path);
  const key = 'rig:' + JSON.stringify(rigToDocument(rig, 'm', 9));
  return {
    kind: 'rig',
    width: rig.projector.resolution[0],
    height: rig.projector.resolution[1],
    key,
    rig,
    build(size, s) {
      checkSquare(size, s);
      const settings = {
        brightness: s.brightness ?? BAKE_DEFAULTS.brightness,
        brightnessFloor: s.brightnessFloor ?? BAKE_DEFAULTS.brightnessFloor,
        feather: s.feather ?? BAKE_DEFAULTS.feather,
        flip: s.flip ?? false,
        rotate: s.rotate ?? 0,
      };
      // tracing every pixel takes a while: kept between runs and shards (map-cache.ts); the rig
      // document names an as-built dome's mesh file only, so its triangles go into the key too
      const dome = rig.dome.mesh;
      const geometry = dome ? `${key} dome:${createHash('sha256').update(bytesOf(dome.positions)).update(bytesOf(dome.indices)).digest('hex')}` : key;
      return cachedMap(cacheDir, mapCacheKey(geometry, size, settings), () => pixelMapFromRig(rig, size, settings));
    },
  };
}
