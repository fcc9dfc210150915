import type { ImageBuffer, RemapMap } from './types.js';

/**
 * Nearest sampling of output row j into out (no gain): the source pixel whose square
 * [p, p+1) × [q, q+1) contains the map point. A point outside [0, W) × [0, H) (or NaN), or with
 * gain ≤ 0, is black with alpha 0. Returns true when some sampled pixel has a gain other than 1.
 */
export function nearestRow(src: ImageBuffer, map: RemapMap, out: ImageBuffer, j: number): boolean {
  switch (src.channels) {
    case 1:
      return nearestRow1(src.data, src.width, src.height, map, out.data, j);
    case 3:
      return nearestRow3(src.data, src.width, src.height, map, out.data, j);
    default:
      return nearestRowN(src.data, src.width, src.height, src.channels, map, out.data, j);
  }
}

function nearestRow1(
  s: Uint8Array | Uint16Array,
  W: number,
  H: number,
  map: RemapMap,
  o: Uint8Array | Uint16Array,
  j: number,
): boolean {
  const mx = map.x;
  const my = map.y;
  const mg = map.gain;
  const w = map.width;
  let scaled = false;
  let k = j * w;
  for (let i = 0; i < w; i++, k++) {
    const x = mx[k];
    const y = my[k];
    const g = mg[k];
    if (x >= 0 && x < W && y >= 0 && y < H && g > 0) {
      if (g !== 1) scaled = true;
      // x, y ≥ 0 here, so truncation is floor.
      o[k] = s[(y | 0) * W + (x | 0)];
    } else o[k] = 0;
  }
  return scaled;
}

function nearestRow3(
  s: Uint8Array | Uint16Array,
  W: number,
  H: number,
  map: RemapMap,
  o: Uint8Array | Uint16Array,
  j: number,
): boolean {
  const mx = map.x;
  const my = map.y;
  const mg = map.gain;
  const w = map.width;
  let scaled = false;
  let k = j * w;
  let oi = k * 3;
  for (let i = 0; i < w; i++, k++, oi += 3) {
    const x = mx[k];
    const y = my[k];
    const g = mg[k];
    if (x >= 0 && x < W && y >= 0 && y < H && g > 0) {
      if (g !== 1) scaled = true;
      const a = ((y | 0) * W + (x | 0)) * 3;
      o[oi] = s[a];
      o[oi + 1] = s[a + 1];
      o[oi + 2] = s[a + 2];
    } else {
      o[oi] = 0;
      o[oi + 1] = 0;
      o[oi + 2] = 0;
    }
  }
  return scaled;
}

function nearestRowN(
  s: Uint8Array | Uint16Array,
  W: number,
  H: number,
  C: number,
  map: RemapMap,
  o: Uint8Array | Uint16Array,
  j: number,
): boolean {
  const mx = map.x;
  const my = map.y;
  const mg = map.gain;
  const w = map.width;
  let scaled = false;
  let k = j * w;
  let oi = k * C;
  for (let i = 0; i < w; i++, k++, oi += C) {
    const x = mx[k];
    const y = my[k];
    const g = mg[k];
    if (x >= 0 && x < W && y >= 0 && y < H && g > 0) {
      if (g !== 1) scaled = true;
      const a = ((y | 0) * W + (x | 0)) * C;
      for (let ch = 0; ch < C; ch++) o[oi + ch] = s[a + ch];
    } else {
      for (let ch = 0; ch < C; ch++) o[oi + ch] = 0;
    }
  }
  return scaled;
}
