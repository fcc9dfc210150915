/**
 * Bilinear sampling in fixed point, from a map prepared once for a source size: for every output
 * pixel the index of its top-left source neighbour and its position between the four neighbours in
 * 1/32 pixel, so that each frame does integer multiply-adds only, with no bounds logic. The 5-bit
 * fraction and the weights summing to 2^10 follow OpenCV's fixed-point remap (INTER_BITS = 5,
 * INTER_TAB_SIZE = 32 in opencv2/imgproc.hpp, the form cv::convertMaps produces).
 *
 * Against the float kernel (bilinear.ts) a fraction moves by at most 1/64 pixel, so a sample moves
 * by at most (|Δx| + |Δy|)/64 of the code-value steps to its neighbours, plus one for rounding:
 * never more than 8 codes in 8 bits, and the same value wherever the map's fractions are multiples
 * of 1/32. Only 8-bit sources with 3 or 4 channels are prepared; remap() uses the float kernel for
 * the rest.
 */
import type { ImageBuffer, RemapMap } from './types.js';

/** Bits of the sub-pixel fraction in each axis. */
export const FIXED_FRACTION_BITS = 5;
const Q = 1 << FIXED_FRACTION_BITS;
const WEIGHT_SHIFT = 2 * FIXED_FRACTION_BITS;
const HALF = 1 << (WEIGHT_SHIFT - 1);

/** A map prepared for fixed-point bilinear sampling of one source size and channel count. */
export interface PreparedBilinear {
  readonly width: number;
  readonly height: number;
  readonly srcWidth: number;
  readonly srcHeight: number;
  readonly channels: 3 | 4;
  /** The map it was prepared from (remap() checks that it is the one given). */
  readonly map: RemapMap;
  /** Sample index of the top-left neighbour; −1: black with alpha 0. */
  readonly offset: Int32Array;
  /** ix · 33 + iy, the fractions in 1/32 pixel (0..32 each). */
  readonly frac: Uint16Array;
  /** 1 where a row holds a gain other than 0 and 1 (it needs scaling after sampling). */
  readonly rowScaled: Uint8Array;
}

let weightTable: Int32Array | undefined;
/** The four weights of each (ix, iy), summing to 2^10: w00, w10, w01, w11. */
function weights(): Int32Array {
  if (weightTable) return weightTable;
  const t = new Int32Array((Q + 1) * (Q + 1) * 4);
  for (let ix = 0; ix <= Q; ix++) {
    for (let iy = 0; iy <= Q; iy++) {
      const k = (ix * (Q + 1) + iy) * 4;
      t[k] = (Q - ix) * (Q - iy);
      t[k + 1] = ix * (Q - iy);
      t[k + 2] = (Q - ix) * iy;
      t[k + 3] = ix * iy;
    }
  }
  weightTable = t;
  return t;
}

/** True when prepareBilinear can serve this source: 8-bit, 3 or 4 channels, at least 2 × 2. */
export function fixedBilinearApplies(src: ImageBuffer): boolean {
  return src.data instanceof Uint8Array && (src.channels === 3 || src.channels === 4) && src.width >= 2 && src.height >= 2;
}

/**
 * Prepares `map` for fixed-point bilinear sampling of an 8-bit source of srcWidth × srcHeight with
 * `channels` channels (3 or 4, source at least 2 × 2). The map must not change afterwards. The
 * same inside test and edge clamping as the float kernel: a point outside [0, W) × [0, H), NaN, or
 * with gain ≤ 0 is black; near the border the neighbours clamp to the edge pixels.
 */
export function prepareBilinear(map: RemapMap, srcWidth: number, srcHeight: number, channels: 3 | 4): PreparedBilinear {
  if (!(channels === 3 || channels === 4)) throw new Error(`Expected 3 or 4 for channels but received ${channels}`);
  if (!Number.isInteger(srcWidth) || !Number.isInteger(srcHeight) || srcWidth < 2 || srcHeight < 2) {
    throw new Error(`Expected a source of at least 2×2 but received ${srcWidth}×${srcHeight}`);
  }
  const W = srcWidth;
  const H = srcHeight;
  const n = map.width * map.height;
  const offset = new Int32Array(n);
  const frac = new Uint16Array(n);
  const rowScaled = new Uint8Array(map.height);
  const { x: mx, y: my, gain: mg } = map;
  for (let j = 0, k = 0; j < map.height; j++) {
    let scaled = 0;
    for (let i = 0; i < map.width; i++, k++) {
      const x = mx[k];
      const y = my[k];
      const g = mg[k];
      if (!(x >= 0 && x < W && y >= 0 && y < H && g > 0)) {
        offset[k] = -1;
        continue;
      }
      if (g !== 1) scaled = 1;
      const sx = x - 0.5;
      const sy = y - 0.5;
      // sx, sy > −1, so truncation toward zero after +1 is floor
      let x0 = ((sx + 1) | 0) - 1;
      let y0 = ((sy + 1) | 0) - 1;
      let ix = ((sx - x0) * Q + 0.5) | 0;
      let iy = ((sy - y0) * Q + 0.5) | 0;
      if (ix === Q) (x0++, (ix = 0));
      if (iy === Q) (y0++, (iy = 0));
      // edges: all the weight on the edge pixel, as the float kernel's clamped neighbours give
      if (x0 < 0) (x0 = 0), (ix = 0);
      else if (x0 >= W - 1) (x0 = W - 2), (ix = Q);
      if (y0 < 0) (y0 = 0), (iy = 0);
      else if (y0 >= H - 1) (y0 = H - 2), (iy = Q);
      offset[k] = (y0 * W + x0) * channels;
      frac[k] = ix * (Q + 1) + iy;
    }
    rowScaled[j] = scaled;
  }
  return { width: map.width, height: map.height, srcWidth, srcHeight, channels, map, offset, frac, rowScaled };
}

/** Samples output row j of `p` from s into o (code values; no gain). Returns true when the row needs scaling. */
export function bilinearFixedRow(s: Uint8Array, p: PreparedBilinear, o: Uint8Array, j: number): boolean {
  // one loop per channel count: the deliberate kernel copies (bilinear.ts says why)
  if (p.channels === 3) bilinearFixedRow3(s, p, o, j);
  else bilinearFixedRow4(s, p, o, j);
  return p.rowScaled[j] === 1;
}

function bilinearFixedRow3(s: Uint8Array, p: PreparedBilinear, o: Uint8Array, j: number): void {
  const { offset, frac } = p;
  const t = weights();
  const stride = p.srcWidth * 3;
  const end = (j + 1) * p.width;
  for (let k = j * p.width, oi = k * 3; k < end; k++, oi += 3) {
    const a = offset[k];
    if (a < 0) {
      o[oi] = 0;
      o[oi + 1] = 0;
      o[oi + 2] = 0;
      continue;
    }
    const f = frac[k] << 2;
    const w00 = t[f];
    const w10 = t[f + 1];
    const w01 = t[f + 2];
    const w11 = t[f + 3];
    const c = a + stride;
    o[oi] = (w00 * s[a] + w10 * s[a + 3] + w01 * s[c] + w11 * s[c + 3] + HALF) >> WEIGHT_SHIFT;
    o[oi + 1] = (w00 * s[a + 1] + w10 * s[a + 4] + w01 * s[c + 1] + w11 * s[c + 4] + HALF) >> WEIGHT_SHIFT;
    o[oi + 2] = (w00 * s[a + 2] + w10 * s[a + 5] + w01 * s[c + 2] + w11 * s[c + 5] + HALF) >> WEIGHT_SHIFT;
  }
}

function bilinearFixedRow4(s: Uint8Array, p: PreparedBilinear, o: Uint8Array, j: number): void {
  const { offset, frac } = p;
  const t = weights();
  const stride = p.srcWidth * 4;
  const end = (j + 1) * p.width;
  for (let k = j * p.width, oi = k * 4; k < end; k++, oi += 4) {
    const a = offset[k];
    if (a < 0) {
      o[oi] = 0;
      o[oi + 1] = 0;
      o[oi + 2] = 0;
      o[oi + 3] = 0;
      continue;
    }
    const f = frac[k] << 2;
    const w00 = t[f];
    const w10 = t[f + 1];
    const w01 = t[f + 2];
    const w11 = t[f + 3];
    const c = a + stride;
    o[oi] = (w00 * s[a] + w10 * s[a + 4] + w01 * s[c] + w11 * s[c + 4] + HALF) >> WEIGHT_SHIFT;
    o[oi + 1] = (w00 * s[a + 1] + w10 * s[a + 5] + w01 * s[c + 1] + w11 * s[c + 5] + HALF) >> WEIGHT_SHIFT;
    o[oi + 2] = (w00 * s[a + 2] + w10 * s[a + 6] + w01 * s[c + 2] + w11 * s[c + 6] + HALF) >> WEIGHT_SHIFT;
    o[oi + 3] = (w00 * s[a + 3] + w10 * s[a + 7] + w01 * s[c + 3] + w11 * s[c + 7] + HALF) >> WEIGHT_SHIFT;
  }
}
