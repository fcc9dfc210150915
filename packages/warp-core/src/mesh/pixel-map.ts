/**
 * The exact per-pixel map for batch warping: every projector pixel centre traced, with its
 * brightness factor and mask, as a RemapMap in dome-master pixel units.
 */
import { DEG } from '../math.js';
import type { Rig } from '../rig/model.js';
import type { RemapMap } from '../remap/types.js';
import { BAKE_DEFAULTS, interpolateCell, type BakeOptions } from './bake.js';
import { pixelSamples } from './pixel-samples.js';
import { rasterTriangles, type TriangleWarpMesh } from './adaptive.js';
import type { FillLayoutGrid } from './fill-layout.js';
import type { WarpMesh } from './mesh.js';

export type MapOptions = Pick<BakeOptions, 'brightness' | 'brightnessFloor' | 'feather'>;

/** How the source frame is turned before sampling (content that arrives mirrored or rotated). */
export interface SourceOrientation {
  /** Mirror the frame left-right before use. */
  flip?: boolean;
  /** Turn the frame clockwise (as seen, v down) by this many degrees before use: any angle. */
  rotate?: number;
}

/**
 * Normalized fisheye (u, v) of our convention → (u, v) in a source frame that arrives flipped and/or
 * rotated: the frame as delivered, turned clockwise by `rotate` and then mirrored if `flip`, would be
 * in our convention. Returned in place.
 */
export function orientUv(uv: [number, number], o: SourceOrientation): [number, number] {
  let [u, v] = uv;
  if (o.flip) u = 1 - u;
  const turn = ((((o.rotate ?? 0) % 360) + 360) % 360);
  switch (turn) {
    case 0:
      break;
    case 90: // delivered frame turned clockwise by 90° gives ours: ours (u, v) came from (v, 1 − u)
      [u, v] = [v, 1 - u];
      break;
    case 180:
      [u, v] = [1 - u, 1 - v];
      break;
    case 270:
      [u, v] = [1 - v, u];
      break;
    default: {
      // ours = the delivered frame turned clockwise by θ about the centre, (x, y) → (x cos θ − y sin θ, x sin θ + y cos θ)
      // with y down; so the delivered point is ours turned back: (x cos θ + y sin θ, −x sin θ + y cos θ)
      const c = Math.cos(turn * DEG);
      const s = Math.sin(turn * DEG);
      const x = u - 0.5;
      const y = v - 0.5;
      u = 0.5 + x * c + y * s;
      v = 0.5 - x * s + y * c;
    }
  }
  uv[0] = u;
  uv[1] = v;
  return uv;
}

function finishMap(u: ArrayLike<number>, v: ArrayLike<number>, gain: Float32Array, size: [number, number], o: SourceOrientation, W: number, H: number): RemapMap {
  const n = W * H;
  const x = new Float32Array(n);
  const y = new Float32Array(n);
  const uv: [number, number] = [0, 0];
  const [sw, sh] = size;
  for (let k = 0; k < n; k++) {
    if (!(gain[k] > 0)) {
      x[k] = Number.NaN;
      y[k] = Number.NaN;
      continue;
    }
    uv[0] = u[k];
    uv[1] = v[k];
    if (o.flip || o.rotate) orientUv(uv, o);
    x[k] = uv[0] * sw;
    y[k] = uv[1] * sh;
  }
  return { width: W, height: H, x, y, gain };
}

/**
 * Traces every projector pixel of the rig: the exact RemapMap onto a source frame of `size` pixels.
 * Its light factor is the one the exact per-pixel samples carry (pixel-samples.ts): brightness times the
 * same mask ramp at the exact edge as the bake's, at its narrowest half a pixel, so a pixel the edge
 * crosses gets the share of it on the lit side instead of all or nothing.
 */
export function pixelMapFromRig(rig: Rig, size: [number, number], options: Partial<MapOptions> & SourceOrientation = {}): RemapMap {
  const o = { ...BAKE_DEFAULTS, ...options };
  const f = pixelSamples(rig, { brightness: o.brightness, brightnessFloor: o.brightnessFloor, feather: o.feather });
  const n = f.width * f.height;
  const gain = new Float32Array(n);
  for (let k = 0; k < n; k++) gain[k] = f.mask[k] > 0 ? f.mask[k] * f.brightness[k] : 0;
  return finishMap(f.u, f.v, gain, size, o, f.width, f.height);
}

/** Interpolates a baked mesh at every projector pixel centre over the same two triangles per cell a GPU draws: the RemapMap the mesh implies. */
export function pixelMapFromMesh(mesh: WarpMesh, size: [number, number], o: SourceOrientation = {}): RemapMap {
  const { cols, rows, width: W, height: H } = mesh;
  const n = W * H;
  const u = new Float32Array(n);
  const v = new Float32Array(n);
  const gain = new Float32Array(n);
  const sx = (cols - 1) / W;
  const sy = (rows - 1) / H;
  for (let j = 0; j < H; j++) {
    const gy = (j + 0.5) * sy;
    const r = Math.min(rows - 2, Math.floor(gy));
    const fy = gy - r;
    for (let i = 0; i < W; i++) {
      const gx = (i + 0.5) * sx;
      const c = Math.min(cols - 2, Math.floor(gx));
      const fx = gx - c;
      const k00 = r * cols + c;
      const k = j * W + i;
      // the two triangles per cell a GPU draws from the .glb, so the CPU warp matches players
      u[k] = interpolateCell(mesh.u, k00, cols, fx, fy, true);
      v[k] = interpolateCell(mesh.v, k00, cols, fx, fy, true);
      const m = interpolateCell(mesh.mask, k00, cols, fx, fy, true);
      const b = interpolateCell(mesh.brightness, k00, cols, fx, fy, true);
      gain[k] = m > 0 ? m * b : 0;
    }
  }
  return finishMap(u, v, gain, size, o, W, H);
}

/** Interpolates a mesh of triangles (the adaptive mesh) at every projector pixel centre, as a GPU draws it: the RemapMap it implies. */
export function pixelMapFromTriangles(mesh: TriangleWarpMesh, size: [number, number], o: SourceOrientation = {}): RemapMap {
  const n = mesh.width * mesh.height;
  const u = new Float32Array(n);
  const v = new Float32Array(n);
  const gain = new Float32Array(n);
  rasterTriangles(mesh, (k, a, b, c, wa, wb, wc) => {
    u[k] = wa * mesh.u[a] + wb * mesh.u[b] + wc * mesh.u[c];
    v[k] = wa * mesh.v[a] + wb * mesh.v[b] + wc * mesh.v[c];
    const m = wa * mesh.mask[a] + wb * mesh.mask[b] + wc * mesh.mask[c];
    const br = wa * mesh.brightness[a] + wb * mesh.brightness[b] + wc * mesh.brightness[c];
    gain[k] = m > 0 ? m * br : 0;
  });
  return finishMap(u, v, gain, size, o, mesh.width, mesh.height);
}

/** A light factor per projector pixel (an MPCDI alpha map), samples in [0, 1], the top row first. */
export interface AlphaMap {
  width: number;
  height: number;
  data: ArrayLike<number>;
}

/**
 * The RemapMap a player draws from a fill-layout warp grid and an alpha map (VESA MPCDI 2.0 §3.6, as
 * DESIGN.md records it): at every projector pixel centre the grid is sampled as a GPU samples a
 * texture (linear filtering, clamp to edge: texel coordinate s·N − 0.5, OpenGL ES 3.0 §3.8.10), the
 * light factor is the alpha map's pixel there (nearest, when the map is not at the projector's
 * resolution). Samples without data (NaN) drop out of the filter, the other weights renormalised; a
 * pixel with none around it is dark.
 */
export function pixelMapFromFillLayout(warp: FillLayoutGrid, alpha: AlphaMap, width: number, height: number, size: [number, number], o: SourceOrientation = {}): RemapMap {
  const { cols: N, rows: M, data } = warp;
  const W = width;
  const H = height;
  const n = W * H;
  const u = new Float32Array(n);
  const v = new Float32Array(n);
  const gain = new Float32Array(n);
  const texel = (s: number, count: number) => Math.min(count - 1, Math.max(0, s * count - 0.5));
  for (let j = 0; j < H; j++) {
    const ty = texel((j + 0.5) / H, M);
    const j0 = Math.min(M - 2, Math.floor(ty));
    const fy = ty - j0;
    const ay = Math.min(alpha.height - 1, Math.floor(((j + 0.5) / H) * alpha.height));
    for (let i = 0; i < W; i++) {
      const k = j * W + i;
      const tx = texel((i + 0.5) / W, N);
      const i0 = Math.min(N - 2, Math.floor(tx));
      const fx = tx - i0;
      let su = 0;
      let sv = 0;
      let sw = 0;
      for (let q = 0; q < 4; q++) {
        const c = i0 + (q & 1);
        const r = j0 + (q >> 1);
        const w = ((q & 1) ? fx : 1 - fx) * ((q >> 1) ? fy : 1 - fy);
        const s = 3 * (r * N + c);
        if (w === 0 || Number.isNaN(data[s]) || Number.isNaN(data[s + 1])) continue;
        su += w * data[s];
        sv += w * data[s + 1];
        sw += w;
      }
      const ax = Math.min(alpha.width - 1, Math.floor(((i + 0.5) / W) * alpha.width));
      if (sw > 0) {
        u[k] = su / sw;
        v[k] = sv / sw;
        gain[k] = alpha.data[ay * alpha.width + ax];
      }
    }
  }
  return finishMap(u, v, gain, size, o, W, H);
}
