import type { ImageBuffer, RemapMap } from './types.js';

/**
 * Bilinear sampling of output row j into out (code values, rounded; no gain). Source pixel centres
 * sit at +0.5, so a map point (x, y) blends the four centres around it; near the border the
 * neighbour indices clamp. A point outside [0, W) × [0, H) (or NaN), or with gain ≤ 0, is black
 * with alpha 0. Returns true when some sampled pixel has a gain other than 1 (the row needs scaling).
 */
export function bilinearRow(src: ImageBuffer, map: RemapMap, out: ImageBuffer, j: number): boolean {
  // Deliberate copies, for speed: one specialised loop per channel count here and in nearest.ts,
  // area.ts and bilinear-fixed.ts (V8 keeps each monomorphic and unrolled; a shared per-channel loop
  // measured slower). The duplicates tool lists these; they stay.
  switch (src.channels) {
    case 1:
      return bilinearRow1(src.data, src.width, src.height, map, out.data, j);
    case 2:
      return bilinearRowN(src.data, src.width, src.height, 2, map, out.data, j);
    case 3:
      return bilinearRow3(src.data, src.width, src.height, map, out.data, j);
    case 4:
      return bilinearRow4(src.data, src.width, src.height, map, out.data, j);
  }
  return false;
}

function bilinearRow3(
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
  const xMax = W - 1;
  const yMax = H - 1;
  const W3 = W * 3;
  let scaled = false;
  let k = j * w;
  let oi = k * 3;
  for (let i = 0; i < w; i++, k++, oi += 3) {
    const x = mx[k];
    const y = my[k];
    const g = mg[k];
    if (!(x >= 0 && x < W && y >= 0 && y < H && g > 0)) {
      o[oi] = 0;
      o[oi + 1] = 0;
      o[oi + 2] = 0;
      continue;
    }
    if (g !== 1) scaled = true;
    const sx = x - 0.5;
    const sy = y - 0.5;
    // sx, sy > −1, so truncation toward zero after +1 is floor.
    let x0 = ((sx + 1) | 0) - 1;
    let y0 = ((sy + 1) | 0) - 1;
    const fx = sx - x0;
    const fy = sy - y0;
    let dx = 3;
    let dy = W3;
    if (x0 < 0) {
      x0 = 0;
      dx = 0;
    } else if (x0 >= xMax) dx = 0;
    if (y0 < 0) {
      y0 = 0;
      dy = 0;
    } else if (y0 >= yMax) dy = 0;
    const a = y0 * W3 + x0 * 3;
    const b = a + dx;
    const c = a + dy;
    const d = c + dx;
    const w11 = fx * fy;
    const w10 = fx - w11;
    const w01 = fy - w11;
    const w00 = 1 - fx - w01;
    o[oi] = w00 * s[a] + w10 * s[b] + w01 * s[c] + w11 * s[d] + 0.5;
    o[oi + 1] = w00 * s[a + 1] + w10 * s[b + 1] + w01 * s[c + 1] + w11 * s[d + 1] + 0.5;
    o[oi + 2] = w00 * s[a + 2] + w10 * s[b + 2] + w01 * s[c + 2] + w11 * s[d + 2] + 0.5;
  }
  return scaled;
}

function bilinearRow4(
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
  const xMax = W - 1;
  const yMax = H - 1;
  const W4 = W * 4;
  let scaled = false;
  let k = j * w;
  let oi = k * 4;
  for (let i = 0; i < w; i++, k++, oi += 4) {
    const x = mx[k];
    const y = my[k];
    const g = mg[k];
    if (!(x >= 0 && x < W && y >= 0 && y < H && g > 0)) {
      o[oi] = 0;
      o[oi + 1] = 0;
      o[oi + 2] = 0;
      o[oi + 3] = 0;
      continue;
    }
    if (g !== 1) scaled = true;
    const sx = x - 0.5;
    const sy = y - 0.5;
    let x0 = ((sx + 1) | 0) - 1;
    let y0 = ((sy + 1) | 0) - 1;
    const fx = sx - x0;
    const fy = sy - y0;
    let dx = 4;
    let dy = W4;
    if (x0 < 0) {
      x0 = 0;
      dx = 0;
    } else if (x0 >= xMax) dx = 0;
    if (y0 < 0) {
      y0 = 0;
      dy = 0;
    } else if (y0 >= yMax) dy = 0;
    const a = y0 * W4 + x0 * 4;
    const b = a + dx;
    const c = a + dy;
    const d = c + dx;
    const w11 = fx * fy;
    const w10 = fx - w11;
    const w01 = fy - w11;
    const w00 = 1 - fx - w01;
    o[oi] = w00 * s[a] + w10 * s[b] + w01 * s[c] + w11 * s[d] + 0.5;
    o[oi + 1] = w00 * s[a + 1] + w10 * s[b + 1] + w01 * s[c + 1] + w11 * s[d + 1] + 0.5;
    o[oi + 2] = w00 * s[a + 2] + w10 * s[b + 2] + w01 * s[c + 2] + w11 * s[d + 2] + 0.5;
    o[oi + 3] = w00 * s[a + 3] + w10 * s[b + 3] + w01 * s[c + 3] + w11 * s[d + 3] + 0.5;
  }
  return scaled;
}

function bilinearRow1(
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
  const xMax = W - 1;
  const yMax = H - 1;
  let scaled = false;
  let k = j * w;
  for (let i = 0; i < w; i++, k++) {
    const x = mx[k];
    const y = my[k];
    const g = mg[k];
    if (!(x >= 0 && x < W && y >= 0 && y < H && g > 0)) {
      o[k] = 0;
      continue;
    }
    if (g !== 1) scaled = true;
    const sx = x - 0.5;
    const sy = y - 0.5;
    let x0 = ((sx + 1) | 0) - 1;
    let y0 = ((sy + 1) | 0) - 1;
    const fx = sx - x0;
    const fy = sy - y0;
    let dx = 1;
    let dy = W;
    if (x0 < 0) {
      x0 = 0;
      dx = 0;
    } else if (x0 >= xMax) dx = 0;
    if (y0 < 0) {
      y0 = 0;
      dy = 0;
    } else if (y0 >= yMax) dy = 0;
    const a = y0 * W + x0;
    const c = a + dy;
    const w11 = fx * fy;
    const w10 = fx - w11;
    const w01 = fy - w11;
    const w00 = 1 - fx - w01;
    o[k] = w00 * s[a] + w10 * s[a + dx] + w01 * s[c] + w11 * s[c + dx] + 0.5;
  }
  return scaled;
}

function bilinearRowN(
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
  const xMax = W - 1;
  const yMax = H - 1;
  const WC = W * C;
  let scaled = false;
  let k = j * w;
  let oi = k * C;
  for (let i = 0; i < w; i++, k++, oi += C) {
    const x = mx[k];
    const y = my[k];
    const g = mg[k];
    if (!(x >= 0 && x < W && y >= 0 && y < H && g > 0)) {
      for (let ch = 0; ch < C; ch++) o[oi + ch] = 0;
      continue;
    }
    if (g !== 1) scaled = true;
    const sx = x - 0.5;
    const sy = y - 0.5;
    let x0 = ((sx + 1) | 0) - 1;
    let y0 = ((sy + 1) | 0) - 1;
    const fx = sx - x0;
    const fy = sy - y0;
    let dx = C;
    let dy = WC;
    if (x0 < 0) {
      x0 = 0;
      dx = 0;
    } else if (x0 >= xMax) dx = 0;
    if (y0 < 0) {
      y0 = 0;
      dy = 0;
    } else if (y0 >= yMax) dy = 0;
    const a = y0 * WC + x0 * C;
    const b = a + dx;
    const c = a + dy;
    const d = c + dx;
    const w11 = fx * fy;
    const w10 = fx - w11;
    const w01 = fy - w11;
    const w00 = 1 - fx - w01;
    for (let ch = 0; ch < C; ch++) {
      o[oi + ch] = w00 * s[a + ch] + w10 * s[b + ch] + w01 * s[c + ch] + w11 * s[d + ch] + 0.5;
    }
  }
  return scaled;
}
