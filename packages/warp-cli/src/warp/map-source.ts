/** Where a warp's map comes from: an exact per-pixel trace of a rig, or a baked mesh in any format bake writes. */
import { createHash } from 'node:crypto';
import { BAKE_DEFAULTS, checkShowsContent, pixelMapFromFillLayout, pixelMapFromMesh, pixelMapFromTriangles, type TriangleWarpMesh, RigError, type AlphaMap, type FillLayoutGrid, pixelMapFromRig, rigToDocument, type RemapMap, type SourceOrientation, type WarpMesh, type Rig } from '@skyfold/warp-core';
import { readBinaryFile, readRig } from '../io/document-file.js';
import { UserError } from '../errors.js';
import { decodeAnyMesh, formatFromPath, type MeshFormat } from '../export/index.js';
import { checkMeshValues } from '../export/check.js';
import { readMpcdi } from '../export/mpcdi.js';
import { readMeshPfm } from '../export/pfm.js';
import { readMapPng } from '../export/png16.js';
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
  /** The mesh file's format (kind 'mesh'). */
  format?: MeshFormat;
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

export interface MapSourceOptions {
  /**
   * The projector resolution a mesh file spans, for the formats that do not carry it (.pfm and the
   * vertex-grid .png); checked against the file for those that do.
   */
  projectorSize?: [number, number];
}

/** What a mesh file read for warping yields: the grid, or for .mpcdi the fill-layout warp and its alpha map. */
type ReadMesh =
  | { mesh: WarpMesh; fill?: undefined; triangles?: undefined }
  | { mesh: WarpMesh; fill: { warp: FillLayoutGrid; alpha: AlphaMap }; triangles?: undefined }
  | { mesh?: undefined; fill?: undefined; triangles: TriangleWarpMesh };

/** Formats that keep brightness apart from the mask, so `--brightness 0` can drop it. */
const SEPARATE_BRIGHTNESS: readonly MeshFormat[] = ['glb', 'obj', 'png', 'csv'];

/** Formats whose files do not say the projector resolution. */
const SIZELESS: readonly MeshFormat[] = ['pfm', 'png'];

async function readMeshForWarp(path: string, format: MeshFormat, bytes: Uint8Array, size: [number, number] | undefined): Promise<ReadMesh> {
  if (SIZELESS.includes(format) && !size) {
    throw new UserError(`${path}: a .${format} warp mesh does not say the projector's resolution; give it with --projector-size WxH (e.g. 1920x1200)`);
  }
  let read: ReadMesh;
  try {
    if (format === 'mpcdi') {
      const m = await readMpcdi(bytes);
      read = { mesh: m.mesh, fill: { warp: m.warp, alpha: m.alpha } };
    } else if (format === 'pfm') {
      const mesh = readMeshPfm(bytes, { width: size![0], height: size![1] });
      // the third channel is the light factor brightness·mask as one value; a player multiplies by it
      // as interpolated, so it stands as the brightness with the mask 1 (the reader's 0/1 mask would
      // apply the edge twice)
      mesh.mask.fill(1);
      read = { mesh };
    } else if (format === 'png') {
      read = { mesh: await readMapPng(bytes, { width: size![0], height: size![1] }) };
    } else {
      const any = await decodeAnyMesh(bytes, format);
      read = any.grid ? { mesh: any.grid } : { triangles: any.triangles! };
    }
    if (read.mesh) checkMeshValues(read.mesh);
  } catch (e) {
    if (e instanceof UserError) throw e;
    throw new UserError(`${path}: not a skyfold warp mesh: ${(e as Error).message.split('\n')[0]}`);
  }
  const { width, height } = read.mesh ?? read.triangles!;
  if (size && (size[0] !== width || size[1] !== height)) {
    throw new UserError(`${path}: the mesh spans a ${width}x${height} projector, not the ${size[0]}x${size[1]} of --projector-size`);
  }
  return read;
}

/**
 * `cacheDir`: where maps traced from a rig are kept between runs (undefined: not kept); see map-cache.ts.
 * A mesh file in any format bake writes (.glb .obj .pfm .mpcdi .png .csv) is read back by its reader.
 */
export async function loadMapSource(path: string, cacheDir: string | undefined = mapCacheDir(runContext().env), options: MapSourceOptions = {}): Promise<MapSource> {
  const format = formatFromPath(path);
  if (format) {
    const bytes = readBinaryFile(path, 'mesh');
    const read = await readMeshForWarp(path, format, bytes, options.projectorSize);
    const mesh = read.mesh;
    const frame = read.mesh ?? read.triangles!;
    const key = 'mesh:' + createHash('sha256').update(bytes).digest('hex') + (SIZELESS.includes(format) ? ` ${frame.width}x${frame.height}` : '');
    return {
      kind: 'mesh',
      format,
      width: frame.width,
      height: frame.height,
      key,
      mesh,
      build(size, s) {
        checkSquare(size, s);
        if (s.brightness === 0 && !SEPARATE_BRIGHTNESS.includes(format)) {
          throw new UserError(`--brightness 0: a .${format} warp mesh holds brightness and mask as one factor, so brightness cannot be turned off; warp from the rig or a .glb`);
        }
        if (read.triangles) {
          const t = read.triangles;
          return pixelMapFromTriangles(s.brightness === 0 ? { ...t, brightness: new Float32Array(t.brightness.length).fill(1) } : t, size, s);
        }
        if (read.fill) return pixelMapFromFillLayout(read.fill.warp, read.fill.alpha, frame.width, frame.height, size, s);
        if (!mesh) throw new Error('a mesh source with no mesh');
        // compensation off: keep only the mask, which the mesh carries separately
        const m = s.brightness === 0 ? { ...mesh, brightness: new Float32Array(mesh.brightness.length).fill(1) } : mesh;
        return pixelMapFromMesh(m, size, s);
      },
    };
  }
  const rig = readRig(path);
  try {
    checkShowsContent(rig); // before anything is written: frames of nothing but black help nobody
  } catch (e) {
    if (e instanceof RigError) throw new UserError(`${path}: nothing to warp: ${e.message}`);
    throw e;
  }
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
