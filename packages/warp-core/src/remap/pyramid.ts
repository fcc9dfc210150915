import type { ImageBuffer } from './types.js';
import { WasmLevels } from './wasm/pyramid-kernel.js';

/**
 * A mip pyramid of a source image: levels[0] is the source itself, level l + 1 is level l reduced
 * by a 2 × 2 box (rounded to the nearest code value), down to 1 × 1. Level l's texel (p, q) covers
 * source pixels [p·2^l, (p+1)·2^l) × [q·2^l, (q+1)·2^l), so a source coordinate x is x / 2^l on
 * level l (pixel centres at +0.5 on every level). An odd last column or row is averaged with
 * itself (edge clamp). `half` is the half level between the source and level 1: the same 2 × 2 box
 * at every pixel, not decimated (texel p averages pixels p and p + 1, clamped at the last), read at
 * x − 0.5. The 'area' filter reads them; build them once per frame with buildPyramid and pass the
 * pyramid as RemapOptions.pyramid when one frame is remapped in several row bands.
 */
export interface SourcePyramid {
  levels: ImageBuffer[];
  half?: ImageBuffer;
}

/** Number of levels, the source included, down to 1 × 1. */
export function pyramidDepth(width: number, height: number): number {
  let n = 1;
  while (width > 1 || height > 1) {
    width = (width + 1) >> 1;
    height = (height + 1) >> 1;
    n++;
  }
  return n;
}

export interface BuildPyramidOptions {
  /** A pyramid from an earlier call whose memory to reuse (levels of the right size and depth are overwritten). */
  into?: SourcePyramid;
  /** How many levels to build, the source included (default: down to 1 × 1). */
  levels?: number;
  /** Reduce 8-bit levels in WebAssembly where it is available (default true); false uses JavaScript. Same result. */
  wasm?: boolean;
}

/** Builds the pyramid of src (levels 1 and up, and the half level; level 0 is src itself, not copied). */
export function buildPyramid(src: ImageBuffer, options: BuildPyramidOptions = {}): SourcePyramid {
  const levels = options.levels ?? pyramidDepth(src.width, src.height);
  const pyr = options.into ?? { levels: [] };
  const spare = pyr.levels.slice();
  const spareHalf = pyr.half;
  pyr.levels.length = 0;
  pyr.levels.push(src);
  const fast = options.wasm !== false ? WasmLevels.create(src, levels) : null;
  // The levels in WebAssembly memory are scratch: each is copied out into the caller's own memory.
  const own = (view: ImageBuffer, reuse: ImageBuffer | undefined): ImageBuffer => {
    const fits = reuse && reuse.data instanceof Uint8Array && reuse.data.length === view.data.length && reuse.data !== src.data;
    const data = fits ? reuse.data : new Uint8Array(view.data.length);
    data.set(view.data);
    return { width: view.width, height: view.height, channels: view.channels, data };
  };
  for (let l = 1; l < levels; l++) {
    pyr.levels.push(fast ? own(fast.level(l), spare[l]) : reduceLevel(pyr.levels[l - 1], spare[l]));
  }
  pyr.half = fast ? own(fast.half(), spareHalf) : halfLevel(src, spareHalf);
  return pyr;
}

/**
 * The half level of `src` (see SourcePyramid), written into `reuse` when that has the right size
 * and depth (and is not src), else into new memory.
 */
export function halfLevel(src: ImageBuffer, reuse?: ImageBuffer): ImageBuffer {
  const { width: W, height: H, channels: C } = src;
  const n = W * H * C;
  const sixteen = src.data instanceof Uint16Array;
  const o =
    reuse && reuse.data !== src.data && reuse.data.length === n && reuse.data instanceof Uint16Array === sixteen
      ? reuse.data
      : sixteen
        ? new Uint16Array(n)
        : new Uint8Array(n);
  const s = src.data;
  const WC = W * C;
  for (let q = 0; q < H; q++) {
    const r0 = q * WC;
    const r1 = q + 1 < H ? r0 + WC : r0;
    const end = r0 + WC - C;
    let oi = r0;
    for (let a = r0, b = r1; a < end; a++, b++, oi++) o[oi] = (s[a] + s[a + C] + s[b] + s[b + C] + 2) >> 2;
    for (let c = 0; c < C; c++, oi++) o[oi] = (2 * (s[end + c] + s[r1 + WC - C + c]) + 2) >> 2;
  }
  return { width: W, height: H, channels: C, data: o };
}

/**
 * The 2 × 2 box reduction of `prev`, written into `reuse` when that has the right size and depth
 * (and is not `prev`), else into new memory.
 */
export function reduceLevel(prev: ImageBuffer, reuse?: ImageBuffer): ImageBuffer {
  const w = (prev.width + 1) >> 1;
  const h = (prev.height + 1) >> 1;
  const C = prev.channels;
  const n = w * h * C;
  const sixteen = prev.data instanceof Uint16Array;
  let level = reuse;
  if (!level || level.data === prev.data || level.data.length !== n || level.data instanceof Uint16Array !== sixteen) {
    level = { width: w, height: h, channels: C, data: sixteen ? new Uint16Array(n) : new Uint8Array(n) };
  } else {
    level = { width: w, height: h, channels: C, data: level.data };
  }
  reduce2x2(prev.data, prev.width, prev.height, C, level.data);
  return level;
}

/** 2 × 2 box reduction with rounding; an odd last column or row is clamped (averaged with itself). */
function reduce2x2(s: Uint8Array | Uint16Array, W: number, H: number, C: number, o: Uint8Array | Uint16Array): void {
  const w = (W + 1) >> 1;
  const h = (H + 1) >> 1;
  const WC = W * C;
  const even = W >> 1; // output columns with two source columns
  for (let q = 0; q < h; q++) {
    const r0 = 2 * q * WC;
    const r1 = 2 * q + 1 < H ? r0 + WC : r0;
    let oi = q * w * C;
    // Both source columns of output column p sit at 2·p·C + c and (2·p + 1)·C + c.
    const end = r0 + even * 2 * C;
    if (C === 3) {
      for (let a = r0, b = r1; a < end; a += 6, b += 6, oi += 3) {
        o[oi] = (s[a] + s[a + 3] + s[b] + s[b + 3] + 2) >> 2;
        o[oi + 1] = (s[a + 1] + s[a + 4] + s[b + 1] + s[b + 4] + 2) >> 2;
        o[oi + 2] = (s[a + 2] + s[a + 5] + s[b + 2] + s[b + 5] + 2) >> 2;
      }
    } else {
      for (let a = r0, b = r1; a < end; a += 2 * C, b += 2 * C) {
        for (let c = 0; c < C; c++, oi++) o[oi] = (s[a + c] + s[a + C + c] + s[b + c] + s[b + C + c] + 2) >> 2;
      }
    }
    if (W & 1) {
      const a = end;
      const b = r1 + (end - r0);
      for (let c = 0; c < C; c++, oi++) o[oi] = (2 * (s[a + c] + s[b + c]) + 2) >> 2;
    }
  }
}
