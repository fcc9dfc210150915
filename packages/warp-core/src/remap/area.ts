import { bilinearAccumulate } from './bilinear.js';
import type { ImageBuffer, RemapMap } from './types.js';

const acc = new Float64Array(4);

/**
 * Footprint-aware supersampling of output row j into out (code values, rounded; no gain).
 *
 * The output pixel's footprint in the source is the parallelogram spanned by the map's local
 * Jacobian J = [∂(x,y)/∂i, ∂(x,y)/∂j], estimated by central differences of neighbouring output
 * pixels (one-sided at the frame edge or where a neighbour falls outside the source). Along each
 * output axis it takes n = ceil(|column|) bilinear samples (1 ≤ n ≤ maxSamples) at stratified
 * positions inside the output pixel, mapped through J, and box-averages them — the classic
 * supersampled area filter (cf. Heckbert, "Fundamentals of Texture Mapping and Image Warping",
 * 1989, on footprints through the Jacobian and supersampling). Samples that land outside the
 * source count as black with alpha 0. Where the map magnifies (columns no longer than 1 source
 * pixel) this is exactly bilinear. Returns true when some sampled pixel has a gain other than 1.
 */
export function areaRow(
  src: ImageBuffer,
  map: RemapMap,
  out: ImageBuffer,
  j: number,
  maxSamples: number,
): boolean {
  const s = src.data;
  const W = src.width;
  const H = src.height;
  const C = src.channels;
  const o = out.data;
  const mx = map.x;
  const my = map.y;
  const mg = map.gain;
  const w = map.width;
  const h = map.height;
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
    // Columns of the Jacobian: (xi, yi) per output step in i, (xj, yj) per step in j.
    let xi = 0;
    let yi = 0;
    const left = i > 0 && inside(mx[k - 1], my[k - 1], W, H);
    const right = i < w - 1 && inside(mx[k + 1], my[k + 1], W, H);
    if (left && right) {
      xi = (mx[k + 1] - mx[k - 1]) * 0.5;
      yi = (my[k + 1] - my[k - 1]) * 0.5;
    } else if (right) {
      xi = mx[k + 1] - x;
      yi = my[k + 1] - y;
    } else if (left) {
      xi = x - mx[k - 1];
      yi = y - my[k - 1];
    }
    let xj = 0;
    let yj = 0;
    const up = j > 0 && inside(mx[k - w], my[k - w], W, H);
    const down = j < h - 1 && inside(mx[k + w], my[k + w], W, H);
    if (up && down) {
      xj = (mx[k + w] - mx[k - w]) * 0.5;
      yj = (my[k + w] - my[k - w]) * 0.5;
    } else if (down) {
      xj = mx[k + w] - x;
      yj = my[k + w] - y;
    } else if (up) {
      xj = x - mx[k - w];
      yj = y - my[k - w];
    }
    const n = sampleCount(Math.sqrt(xi * xi + yi * yi), maxSamples);
    const m = sampleCount(Math.sqrt(xj * xj + yj * yj), maxSamples);
    for (let ch = 0; ch < C; ch++) acc[ch] = 0;
    if (n === 1 && m === 1) {
      bilinearAccumulate(s, W, H, C, x, y, acc);
      for (let ch = 0; ch < C; ch++) o[oi + ch] = acc[ch] + 0.5;
      continue;
    }
    for (let b = 0; b < m; b++) {
      const v = (b + 0.5) / m - 0.5;
      const rx = x + xj * v;
      const ry = y + yj * v;
      for (let a = 0; a < n; a++) {
        const u = (a + 0.5) / n - 0.5;
        bilinearAccumulate(s, W, H, C, rx + xi * u, ry + yi * u, acc);
      }
    }
    const inv = 1 / (n * m);
    for (let ch = 0; ch < C; ch++) o[oi + ch] = acc[ch] * inv + 0.5;
  }
  return scaled;
}

function inside(x: number, y: number, W: number, H: number): boolean {
  return x >= 0 && x < W && y >= 0 && y < H;
}

/** Samples along one axis for a footprint `len` source pixels long; 1 % slack absorbs map rounding. */
function sampleCount(len: number, maxSamples: number): number {
  if (!(len > 1.01)) return 1;
  const n = Math.ceil(len - 0.01);
  return n < maxSamples ? n : maxSamples;
}
