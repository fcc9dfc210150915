import type { ImageBuffer, RemapMap } from './types.js';

/**
 * What the 'area' filter reads: levels[0] is the source and levels[l] its pyramid level l; `half`
 * is the half level between the source and level 1 (see SourcePyramid). A level beyond `built`,
 * or the half level, is made by `make` / `makeHalf` when a pixel first needs it, so a map that
 * never minifies builds none.
 */
export interface AreaLevels {
  levels: ImageBuffer[];
  built: number;
  /** Index of the coarsest level there is (1 × 1). */
  top: number;
  half: ImageBuffer | undefined;
  /** Returns level l, the 2 × 2 reduction of levels[l − 1]. */
  make: (l: number) => ImageBuffer;
  makeHalf: () => ImageBuffer;
}

/** Returns level l, building the levels below it first if need be. */
function level(lv: AreaLevels, l: number): ImageBuffer {
  while (lv.built <= l) {
    lv.levels[lv.built] = lv.make(lv.built);
    lv.built++;
  }
  return lv.levels[l];
}

/**
 * The image of filter stage k: stage 0 is the source, stage 1 the half level, stage k ≥ 2 pyramid
 * level k − 1 (making it if need be). Stage k filters at about 2^((k−1)/2) source pixels up to k = 2,
 * then doubles: the half level puts a stage between the source and level 1.
 */
function stageImage(lv: AreaLevels, k: number): ImageBuffer {
  if (k === 1) return (lv.half ??= lv.makeHalf());
  return level(lv, k === 0 ? 0 : k - 1);
}

const acc = new Float64Array(4);
/** 2^−l: a source coordinate times SCALE[l] is the coordinate on level l. */
const SCALE = Float64Array.from({ length: 32 }, (_, l) => 2 ** -l);
/** σ₁ ≤ 1.01 source pixels: the map magnifies (1 % slack absorbs map rounding); plain bilinear. */
const MAGNIFY2 = 1.01 * 1.01;
const SQRT2 = Math.SQRT2;
const TO_HALF = 1 / (SQRT2 - 1);
const TO_ONE = 1 / (2 - SQRT2);

// The stage pair of the filter scale last looked up: stages `stage` and stage + 1, blended by t.
let stageT = 0;

/**
 * The filter stage for a footprint of f source pixels (returned; its blend toward the next stage
 * goes to stageT): the source up to f = 1, then source ↔ half level up to √2, half level ↔ level 1
 * up to 2, then level l ↔ level l + 1 for 2^l ≤ f < 2^(l+1), each blend linear in f.
 */
function stageFor(f: number, top: number): number {
  stageT = 0;
  if (!(f > 1)) return 0;
  if (f < SQRT2) {
    stageT = (f - 1) * TO_HALF;
    return 0;
  }
  if (f < 2 || top === 0) {
    if (top > 0) stageT = (f - SQRT2) * TO_ONE;
    return 1;
  }
  let l = 1;
  let size = 2;
  while (f >= 2 * size && l < top) {
    size *= 2;
    l++;
  }
  // Exact: f − size is exact for size ≤ f < 2·size, and so is scaling by 2^−l.
  if (l < top && f > size) stageT = f * SCALE[l] - 1;
  if (stageT > 1) stageT = 1;
  return l + 1;
}

/**
 * Anisotropic, footprint-aware sampling of output row j into out (code values, rounded; no gain),
 * on a box-filtered mip pyramid of the source.
 *
 * The output pixel's footprint in the source is the image of the unit pixel square under the map's
 * local Jacobian J = [∂(x,y)/∂i, ∂(x,y)/∂j], estimated by central differences of neighbouring output
 * pixels (one-sided at the frame edge or where a neighbour falls outside the source). Its extents
 * along the principal axes are the singular values σ₁ ≥ σ₂ of J (square roots of the eigenvalues
 * of J·Jᵀ). Following the anisotropic scheme of the OpenGL EXT_texture_filter_anisotropic
 * specification and "Feline" (McCormack et al., SIGGRAPH 1999), it takes n = round(σ₁ / max(σ₂, 1))
 * probes (1 ≤ n ≤ maxSamples) spaced evenly along the major axis, each a trilinear sample (Williams,
 * "Pyramidal Parametrics", SIGGRAPH 1983) at the scale f = max(σ₂, σ₁ / n) source pixels: bilinear
 * on two neighbouring stages of the pyramid blended linearly in f (see stageFor), so the filter
 * widens smoothly with the footprint and no level boundary shows. Between the source and level 1
 * a half level (the 2 × 2 box, not decimated) keeps footprints of 1–2 pixels from blending in an
 * unfiltered bilinear sample of the source, which would alias. Probes that land outside the source
 * count as black with alpha 0. Where the map magnifies (σ₁ ≤ 1) this is exactly bilinear; where only
 * one axis minifies it takes n bilinear probes on the source itself. Against a brute-force box
 * filter over the footprint it is a little softer (each stage adds its own bilinear tent), and it
 * takes about 2–6 bilinear samples per minified pixel instead of up to 64.
 * Returns true when some sampled pixel has a gain other than 1.
 */
export function areaRow(lv: AreaLevels, map: RemapMap, out: ImageBuffer, j: number, maxSamples: number): boolean {
  const C = lv.levels[0].channels;
  return C === 3 || C === 4 ? areaRowColour(lv, map, out.data, j, maxSamples, C) : areaRowN(lv, map, out.data, j, maxSamples);
}

// The probes of the pixel last planned: first probe (px, py), step (ex, ey) along the major axis,
// count n, stage k and blend t toward stage k + 1.
const fp = new Float64Array(7);
const FP_PX = 0;
const FP_PY = 1;
const FP_EX = 2;
const FP_EY = 3;
const FP_N = 4;
const FP_K = 5;
const FP_T = 6;

/**
 * Plans the probes of output pixel (i, j) = index k, whose map point lies inside the W × H source,
 * into fp. Returns false when the map magnifies there: then one bilinear sample at the map point
 * is the answer. areaRowColour has this written out; the two must stay the same arithmetic.
 */
function placeProbes(mx: Float32Array, my: Float32Array, w: number, h: number, W: number, H: number, i: number, j: number, k: number, maxSamples: number, top: number): boolean {
  const x = mx[k];
  const y = my[k];
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
  // J·Jᵀ = [[a, b], [b, d]]; its eigenvalues are σ₁², σ₂².
  const a = xi * xi + xj * xj;
  const b = xi * yi + xj * yj;
  const d = yi * yi + yj * yj;
  const mean = 0.5 * (a + d);
  const half = 0.5 * (a - d);
  const r = Math.sqrt(half * half + b * b);
  const l1 = mean + r;
  if (!(l1 > MAGNIFY2)) return false;
  const l2 = mean - r;
  const s1 = Math.sqrt(l1);
  // Probe count and scale; σ₁ < 1.5·max(σ₂, 1) (compared squared) is one probe at scale σ₁.
  let n = 1;
  let spacing = s1;
  let f = s1;
  if (!(l1 < 2.25 * (l2 > 1 ? l2 : 1))) {
    const s2 = l2 > 0 ? Math.sqrt(l2) : 0;
    n = probes(s1, s2, maxSamples);
    spacing = s1 / n;
    f = s2 > spacing ? s2 : spacing;
  }
  fp[FP_K] = stageFor(f, top);
  fp[FP_T] = stageT;
  fp[FP_N] = n;
  fp[FP_PX] = x;
  fp[FP_PY] = y;
  if (n === 1) return true;
  // One probe spacing along the major axis (an eigenvector of J·Jᵀ for σ₁²).
  let ex = a >= d ? l1 - d : b;
  let ey = a >= d ? b : l1 - a;
  const norm = Math.sqrt(ex * ex + ey * ey);
  if (norm > 0) {
    ex *= spacing / norm;
    ey *= spacing / norm;
  } else {
    ex = 0;
    ey = 0;
  }
  fp[FP_EX] = ex;
  fp[FP_EY] = ey;
  fp[FP_PX] = x - ex * (n - 1) * 0.5;
  fp[FP_PY] = y - ey * (n - 1) * 0.5;
  return true;
}

function areaRowN(lv: AreaLevels, map: RemapMap, o: Uint8Array | Uint16Array, j: number, maxSamples: number): boolean {
  const src = lv.levels[0];
  const W = src.width;
  const H = src.height;
  const C = src.channels;
  const mx = map.x;
  const my = map.y;
  const mg = map.gain;
  const w = map.width;
  const h = map.height;
  const top = lv.top;
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
    for (let ch = 0; ch < C; ch++) acc[ch] = 0;
    if (!placeProbes(mx, my, w, h, W, H, i, j, k, maxSamples, top)) {
      // Magnified: one bilinear sample, the same arithmetic as the bilinear filter.
      addN(src.data, W, H, C, x, y, 1);
      for (let ch = 0; ch < C; ch++) o[oi + ch] = acc[ch] + 0.5;
      continue;
    }
    const n = fp[FP_N];
    const stage = fp[FP_K];
    const t = fp[FP_T];
    const ex = n > 1 ? fp[FP_EX] : 0;
    const ey = n > 1 ? fp[FP_EY] : 0;
    // Stage k's probes, then stage k + 1's: the order of areaRowColour's sums.
    for (let pass = 0; pass < 2; pass++) {
      const wt = pass === 0 ? (1 - t) / n : t / n;
      if (wt === 0) continue;
      const kk = stage + pass;
      const L = stageImage(lv, kk);
      const sc = kk <= 1 ? 1 : SCALE[kk - 1];
      const shift = kk === 1 ? -0.5 : 0;
      let px = fp[FP_PX];
      let py = fp[FP_PY];
      for (let p = 0; p < n; p++, px += ex, py += ey) {
        if (!(px >= 0 && px < W && py >= 0 && py < H)) continue;
        addN(L.data, L.width, L.height, C, px * sc + shift, py * sc + shift, wt);
      }
    }
    for (let ch = 0; ch < C; ch++) o[oi + ch] = acc[ch] + 0.5;
  }
  return scaled;
}

/** areaRowN for RGB and RGBA, with placeProbes() and the bilinear samples written out and summed in locals. */
function areaRowColour(lv: AreaLevels, map: RemapMap, o: Uint8Array | Uint16Array, j: number, maxSamples: number, C: 3 | 4): boolean {
  const four = C === 4;
  const src = lv.levels[0];
  const s = src.data;
  const W = src.width;
  const H = src.height;
  const mx = map.x;
  const my = map.y;
  const mg = map.gain;
  const w = map.width;
  const h = map.height;
  const top = lv.top;
  let scaled = false;
  let k = j * w;
  let oi = k * C;
  for (let i = 0; i < w; i++, k++, oi += C) {
    const x = mx[k];
    const y = my[k];
    const g = mg[k];
    if (!(x >= 0 && x < W && y >= 0 && y < H && g > 0)) {
      o[oi] = 0;
      o[oi + 1] = 0;
      o[oi + 2] = 0;
      if (four) o[oi + 3] = 0;
      continue;
    }
    if (g !== 1) scaled = true;
    // The footprint, as in placeProbes() (written out here: the call and its stores cost a third of the kernel).
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
    const a = xi * xi + xj * xj;
    const b = xi * yi + xj * yj;
    const d = yi * yi + yj * yj;
    const mean = 0.5 * (a + d);
    const half = 0.5 * (a - d);
    const r = Math.sqrt(half * half + b * b);
    const l1 = mean + r;
    if (!(l1 > MAGNIFY2)) {
      // Magnified: one bilinear sample, the same arithmetic as the bilinear filter.
      const sx = x - 0.5;
      const sy = y - 0.5;
      let x0 = ((sx + 1) | 0) - 1;
      let y0 = ((sy + 1) | 0) - 1;
      const fx = sx - x0;
      const fy = sy - y0;
      let dx: number = C;
      let dy = W * C;
      if (x0 < 0) {
        x0 = 0;
        dx = 0;
      } else if (x0 >= W - 1) dx = 0;
      if (y0 < 0) {
        y0 = 0;
        dy = 0;
      } else if (y0 >= H - 1) dy = 0;
      const ia = (y0 * W + x0) * C;
      const ib = ia + dx;
      const ic = ia + dy;
      const id = ic + dx;
      const w11 = fx * fy;
      const w10 = fx - w11;
      const w01 = fy - w11;
      const w00 = 1 - fx - w01;
      o[oi] = w00 * s[ia] + w10 * s[ib] + w01 * s[ic] + w11 * s[id] + 0.5;
      o[oi + 1] = w00 * s[ia + 1] + w10 * s[ib + 1] + w01 * s[ic + 1] + w11 * s[id + 1] + 0.5;
      o[oi + 2] = w00 * s[ia + 2] + w10 * s[ib + 2] + w01 * s[ic + 2] + w11 * s[id + 2] + 0.5;
      if (four) o[oi + 3] = w00 * s[ia + 3] + w10 * s[ib + 3] + w01 * s[ic + 3] + w11 * s[id + 3] + 0.5;
      continue;
    }
    const l2 = mean - r;
    const s1 = Math.sqrt(l1);
    // Probe count and scale; σ₁ < 1.5·max(σ₂, 1) (compared squared) is one probe at scale σ₁.
    let n = 1;
    let spacing = s1;
    let f = s1;
    if (!(l1 < 2.25 * (l2 > 1 ? l2 : 1))) {
      const s2 = l2 > 0 ? Math.sqrt(l2) : 0;
      n = probes(s1, s2, maxSamples);
      spacing = s1 / n;
      f = s2 > spacing ? s2 : spacing;
    }
    const stage = stageFor(f, top);
    const t = stageT;
    // The images of stages `stage` and stage + 1 (made if need be), their scales and offsets.
    const L0 = stageImage(lv, stage);
    const L1 = t > 0 ? stageImage(lv, stage + 1) : L0;
    const sc0 = stage <= 1 ? 1 : SCALE[stage - 1];
    const sc1 = stage === 0 ? 1 : SCALE[stage];
    const sh0 = stage === 1 ? -0.5 : 0;
    const sh1 = stage === 0 ? -0.5 : 0;
    const w0 = (1 - t) / n;
    const w1 = t / n;
    let r0 = 0;
    let r1 = 0;
    let r2 = 0;
    let r3 = 0;
    if (n === 1) {
      // One probe at (x, y) (the common, nearly isotropic footprint): stage k, then stage k + 1.
      let sc = sc0;
      let sh = sh0;
      let ld = L0.data;
      let Wl = L0.width;
      let Hl = L0.height;
      let wt = w0;
      for (let pass = 0; pass < 2; pass++) {
        if (wt !== 0) {
          const sx = x * sc + sh - 0.5;
          const sy = y * sc + sh - 0.5;
          let x0 = ((sx + 1) | 0) - 1;
          let y0 = ((sy + 1) | 0) - 1;
          const fx = sx - x0;
          const fy = sy - y0;
          let dx: number = C;
          let dy = Wl * C;
          if (x0 < 0) {
            x0 = 0;
            dx = 0;
          } else if (x0 >= Wl - 1) dx = 0;
          if (y0 < 0) {
            y0 = 0;
            dy = 0;
          } else if (y0 >= Hl - 1) dy = 0;
          const ia = (y0 * Wl + x0) * C;
          const ib = ia + dx;
          const ic = ia + dy;
          const id = ic + dx;
          const w11 = fx * fy;
          const w10 = fx - w11;
          const w01 = fy - w11;
          const w00 = 1 - fx - w01;
          r0 += wt * (w00 * ld[ia] + w10 * ld[ib] + w01 * ld[ic] + w11 * ld[id]);
          r1 += wt * (w00 * ld[ia + 1] + w10 * ld[ib + 1] + w01 * ld[ic + 1] + w11 * ld[id + 1]);
          r2 += wt * (w00 * ld[ia + 2] + w10 * ld[ib + 2] + w01 * ld[ic + 2] + w11 * ld[id + 2]);
          if (four) r3 += wt * (w00 * ld[ia + 3] + w10 * ld[ib + 3] + w01 * ld[ic + 3] + w11 * ld[id + 3]);
        }
        if (t === 0) break;
        sc = sc1;
        sh = sh1;
        ld = L1.data;
        Wl = L1.width;
        Hl = L1.height;
        wt = w1;
      }
      o[oi] = r0 + 0.5;
      o[oi + 1] = r1 + 0.5;
      o[oi + 2] = r2 + 0.5;
      if (four) o[oi + 3] = r3 + 0.5;
      continue;
    }
    let ex = a >= d ? l1 - d : b;
    let ey = a >= d ? b : l1 - a;
    const norm = Math.sqrt(ex * ex + ey * ey);
    if (norm > 0) {
      ex *= spacing / norm;
      ey *= spacing / norm;
    } else {
      ex = 0;
      ey = 0;
    }
    const px0 = x - ex * (n - 1) * 0.5;
    const py0 = y - ey * (n - 1) * 0.5;
    // Two passes over the probes, one per level, so that each pass reads one array.
    for (let pass = 0; pass < 2; pass++) {
      const wt = pass === 0 ? w0 : w1;
      if (wt === 0) continue;
      const L = pass === 0 ? L0 : L1;
      const ld = L.data;
      const Wl = L.width;
      const Hl = L.height;
      const WlC = Wl * C;
      const sc = pass === 0 ? sc0 : sc1;
      const sh = pass === 0 ? sh0 : sh1;
      let px = px0;
      let py = py0;
      for (let p = 0; p < n; p++, px += ex, py += ey) {
        if (!(px >= 0 && px < W && py >= 0 && py < H)) continue;
        const sx = px * sc + sh - 0.5;
        const sy = py * sc + sh - 0.5;
        let x0 = ((sx + 1) | 0) - 1;
        let y0 = ((sy + 1) | 0) - 1;
        const fx = sx - x0;
        const fy = sy - y0;
        let dx: number = C;
        let dy = WlC;
        if (x0 < 0) {
          x0 = 0;
          dx = 0;
        } else if (x0 >= Wl - 1) dx = 0;
        if (y0 < 0) {
          y0 = 0;
          dy = 0;
        } else if (y0 >= Hl - 1) dy = 0;
        const ia = y0 * WlC + x0 * C;
        const ib = ia + dx;
        const ic = ia + dy;
        const id = ic + dx;
        const w11 = fx * fy;
        const w10 = fx - w11;
        const w01 = fy - w11;
        const w00 = 1 - fx - w01;
        r0 += wt * (w00 * ld[ia] + w10 * ld[ib] + w01 * ld[ic] + w11 * ld[id]);
        r1 += wt * (w00 * ld[ia + 1] + w10 * ld[ib + 1] + w01 * ld[ic + 1] + w11 * ld[id + 1]);
        r2 += wt * (w00 * ld[ia + 2] + w10 * ld[ib + 2] + w01 * ld[ic + 2] + w11 * ld[id + 2]);
        if (four) r3 += wt * (w00 * ld[ia + 3] + w10 * ld[ib + 3] + w01 * ld[ic + 3] + w11 * ld[id + 3]);
      }
    }
    o[oi] = r0 + 0.5;
    o[oi + 1] = r1 + 0.5;
    o[oi + 2] = r2 + 0.5;
    if (four) o[oi + 3] = r3 + 0.5;
  }
  return scaled;
}

/**
 * Probes along the major axis: the anisotropy σ₁ / max(σ₂, 1) rounded, so that a footprint up to
 * 1.5 times longer than wide takes one (isotropic) probe on the level of its longer side.
 */
function probes(s1: number, s2: number, maxSamples: number): number {
  const n = Math.round(s1 / (s2 > 1 ? s2 : 1));
  return n < 1 ? 1 : n > maxSamples ? maxSamples : n;
}

function inside(x: number, y: number, W: number, H: number): boolean {
  return x >= 0 && x < W && y >= 0 && y < H;
}

/**
 * Adds wt × the bilinear sample at (x, y) of a W × H, C-channel level to acc[0..C-1]. (x, y) must
 * lie in [0, W] × [0, H]; neighbour indices clamp at the border. With wt = 1 the sum is exactly
 * the bilinear filter's value before rounding (the same weights in the same order).
 */
function addN(s: Uint8Array | Uint16Array, W: number, H: number, C: number, x: number, y: number, wt: number): void {
  const sx = x - 0.5;
  const sy = y - 0.5;
  // sx, sy ≥ −0.5, so truncation toward zero after +1 is floor.
  let x0 = ((sx + 1) | 0) - 1;
  let y0 = ((sy + 1) | 0) - 1;
  const fx = sx - x0;
  const fy = sy - y0;
  let dx = C;
  let dy = W * C;
  if (x0 < 0) {
    x0 = 0;
    dx = 0;
  } else if (x0 >= W - 1) {
    x0 = W - 1;
    dx = 0;
  }
  if (y0 < 0) {
    y0 = 0;
    dy = 0;
  } else if (y0 >= H - 1) {
    y0 = H - 1;
    dy = 0;
  }
  const ia = (y0 * W + x0) * C;
  const ib = ia + dx;
  const ic = ia + dy;
  const id = ic + dx;
  const w11 = fx * fy;
  const w10 = fx - w11;
  const w01 = fy - w11;
  const w00 = 1 - fx - w01;
  for (let ch = 0; ch < C; ch++) {
    acc[ch] += wt * (w00 * s[ia + ch] + w10 * s[ib + ch] + w01 * s[ic + ch] + w11 * s[id + ch]);
  }
}

/**
 * The 'area' filter's per-pixel footprints, worked out once per map instead of every frame: for
 * each output pixel whether it lies in the source and whether the map magnifies there, its stage
 * and blend, its probe count and, for pixels with more than one probe, the step along the major
 * axis. The numbers are placeProbes()'s own, so a remap with the plan gives the same pixels as one
 * without (tests/remap-area-plan.test.ts holds this). Independent of the gain.
 */
export interface PreparedArea {
  readonly map: RemapMap;
  readonly srcWidth: number;
  readonly srcHeight: number;
  readonly maxSamples: number;
  /** 0: outside the source (black); 1: magnified (one bilinear sample); 2: one probe; 3: several. */
  readonly kind: Uint8Array;
  readonly stage: Uint8Array;
  readonly count: Uint16Array;
  readonly blend: Float64Array;
  /** Steps (ex, ey) of the kind-3 pixels in raster order; rowFirst[j] is row j's first. */
  readonly step: Float64Array;
  readonly rowFirst: Int32Array;
}

/** Plans the 'area' filter's footprints of `map` for a srcWidth × srcHeight source (see PreparedArea). */
export function planArea(map: RemapMap, srcWidth: number, srcHeight: number, maxSamples: number, top: number): PreparedArea {
  const w = map.width;
  const h = map.height;
  const mx = map.x;
  const my = map.y;
  const kind = new Uint8Array(w * h);
  const stage = new Uint8Array(w * h);
  const count = new Uint16Array(w * h);
  const blend = new Float64Array(w * h);
  const rowFirst = new Int32Array(h + 1);
  let steps: Float64Array = new Float64Array(1024);
  let ns = 0;
  for (let j = 0, k = 0; j < h; j++) {
    rowFirst[j] = ns;
    for (let i = 0; i < w; i++, k++) {
      if (!inside(mx[k], my[k], srcWidth, srcHeight)) continue;
      if (!placeProbes(mx, my, w, h, srcWidth, srcHeight, i, j, k, maxSamples, top)) {
        kind[k] = 1;
        continue;
      }
      const n = fp[FP_N];
      stage[k] = fp[FP_K];
      blend[k] = fp[FP_T];
      count[k] = n;
      kind[k] = n === 1 ? 2 : 3;
      if (n === 1) continue;
      if (2 * ns + 2 > steps.length) {
        const grown = new Float64Array(steps.length * 2);
        grown.set(steps);
        steps = grown;
      }
      steps[2 * ns] = fp[FP_EX];
      steps[2 * ns + 1] = fp[FP_EY];
      ns++;
    }
  }
  rowFirst[h] = ns;
  return { map, srcWidth, srcHeight, maxSamples, kind, stage, count, blend, step: steps.slice(0, 2 * ns), rowFirst };
}

/** areaRowColour from a PreparedArea: the same samples, weights and sums, without the footprint arithmetic. */
export function areaRowPlanned(lv: AreaLevels, plan: PreparedArea, map: RemapMap, out: ImageBuffer, j: number): boolean {
  const src = lv.levels[0];
  const C = src.channels;
  const four = C === 4;
  const o = out.data;
  const s = src.data;
  const W = src.width;
  const H = src.height;
  const mx = map.x;
  const my = map.y;
  const mg = map.gain;
  const w = map.width;
  const { kind, stage: stages, count, blend, step } = plan;
  let e = 2 * plan.rowFirst[j];
  let scaled = false;
  let k = j * w;
  let oi = k * C;
  for (let i = 0; i < w; i++, k++, oi += C) {
    const kk = kind[k];
    const g = mg[k];
    if (kk === 0 || !(g > 0)) {
      if (kk === 3) e += 2;
      o[oi] = 0;
      o[oi + 1] = 0;
      o[oi + 2] = 0;
      if (four) o[oi + 3] = 0;
      continue;
    }
    if (g !== 1) scaled = true;
    const x = mx[k];
    const y = my[k];
    if (kk === 1) {
      const sx = x - 0.5;
      const sy = y - 0.5;
      let x0 = ((sx + 1) | 0) - 1;
      let y0 = ((sy + 1) | 0) - 1;
      const fx = sx - x0;
      const fy = sy - y0;
      let dx: number = C;
      let dy = W * C;
      if (x0 < 0) {
        x0 = 0;
        dx = 0;
      } else if (x0 >= W - 1) dx = 0;
      if (y0 < 0) {
        y0 = 0;
        dy = 0;
      } else if (y0 >= H - 1) dy = 0;
      const ia = (y0 * W + x0) * C;
      const ib = ia + dx;
      const ic = ia + dy;
      const id = ic + dx;
      const w11 = fx * fy;
      const w10 = fx - w11;
      const w01 = fy - w11;
      const w00 = 1 - fx - w01;
      o[oi] = w00 * s[ia] + w10 * s[ib] + w01 * s[ic] + w11 * s[id] + 0.5;
      o[oi + 1] = w00 * s[ia + 1] + w10 * s[ib + 1] + w01 * s[ic + 1] + w11 * s[id + 1] + 0.5;
      o[oi + 2] = w00 * s[ia + 2] + w10 * s[ib + 2] + w01 * s[ic + 2] + w11 * s[id + 2] + 0.5;
      if (four) o[oi + 3] = w00 * s[ia + 3] + w10 * s[ib + 3] + w01 * s[ic + 3] + w11 * s[id + 3] + 0.5;
      continue;
    }
    const stage = stages[k];
    const t = blend[k];
    const n = count[k];
    const L0 = stageImage(lv, stage);
    const L1 = t > 0 ? stageImage(lv, stage + 1) : L0;
    const sc0 = stage <= 1 ? 1 : SCALE[stage - 1];
    const sc1 = stage === 0 ? 1 : SCALE[stage];
    const sh0 = stage === 1 ? -0.5 : 0;
    const sh1 = stage === 0 ? -0.5 : 0;
    const w0 = (1 - t) / n;
    const w1 = t / n;
    let r0 = 0;
    let r1 = 0;
    let r2 = 0;
    let r3 = 0;
    let ex = 0;
    let ey = 0;
    let px0 = x;
    let py0 = y;
    if (kk === 3) {
      ex = step[e];
      ey = step[e + 1];
      e += 2;
      px0 = x - ex * (n - 1) * 0.5;
      py0 = y - ey * (n - 1) * 0.5;
    }
    for (let pass = 0; pass < 2; pass++) {
      const wt = pass === 0 ? w0 : w1;
      if (wt === 0) continue;
      const L = pass === 0 ? L0 : L1;
      const ld = L.data;
      const Wl = L.width;
      const Hl = L.height;
      const WlC = Wl * C;
      const sc = pass === 0 ? sc0 : sc1;
      const sh = pass === 0 ? sh0 : sh1;
      let px = px0;
      let py = py0;
      for (let p = 0; p < n; p++, px += ex, py += ey) {
        if (!(px >= 0 && px < W && py >= 0 && py < H)) continue;
        const sx = px * sc + sh - 0.5;
        const sy = py * sc + sh - 0.5;
        let x0 = ((sx + 1) | 0) - 1;
        let y0 = ((sy + 1) | 0) - 1;
        const fx = sx - x0;
        const fy = sy - y0;
        let dx: number = C;
        let dy = WlC;
        if (x0 < 0) {
          x0 = 0;
          dx = 0;
        } else if (x0 >= Wl - 1) dx = 0;
        if (y0 < 0) {
          y0 = 0;
          dy = 0;
        } else if (y0 >= Hl - 1) dy = 0;
        const ia = y0 * WlC + x0 * C;
        const ib = ia + dx;
        const ic = ia + dy;
        const id = ic + dx;
        const w11 = fx * fy;
        const w10 = fx - w11;
        const w01 = fy - w11;
        const w00 = 1 - fx - w01;
        r0 += wt * (w00 * ld[ia] + w10 * ld[ib] + w01 * ld[ic] + w11 * ld[id]);
        r1 += wt * (w00 * ld[ia + 1] + w10 * ld[ib + 1] + w01 * ld[ic + 1] + w11 * ld[id + 1]);
        r2 += wt * (w00 * ld[ia + 2] + w10 * ld[ib + 2] + w01 * ld[ic + 2] + w11 * ld[id + 2]);
        if (four) r3 += wt * (w00 * ld[ia + 3] + w10 * ld[ib + 3] + w01 * ld[ic + 3] + w11 * ld[id + 3]);
      }
    }
    o[oi] = r0 + 0.5;
    o[oi + 1] = r1 + 0.5;
    o[oi + 2] = r2 + 0.5;
    if (four) o[oi + 3] = r3 + 0.5;
  }
  return scaled;
}
