import {
  SRGB_ENCODE16_STEPS,
  SRGB_ENCODE8_STEPS,
  srgbDecodeLut16,
  srgbDecodeLut8,
  srgbEncodeLut16,
  srgbEncodeLut8,
} from '../srgb.js';
import { areaRow, areaRowPlanned, planArea, type AreaLevels, type PreparedArea } from './area.js';
import { bilinearRow } from './bilinear.js';
import { bilinearFixedRow, type PreparedBilinear } from './bilinear-fixed.js';
import { nearestRow } from './nearest.js';
import { halfLevel, pyramidDepth, reduceLevel, type SourcePyramid } from './pyramid.js';
import { WasmLevels } from './wasm/pyramid-kernel.js';
import type { ImageBuffer, RemapFilter, RemapMap } from './types.js';

export interface RemapOptions {
  /** Sampling filter. 'area' (the default) anti-aliases where the map minifies. */
  filter?: RemapFilter;
  /** Receives the result (width and height of the map, channels and depth of the source); reused, not reallocated. */
  out?: ImageBuffer;
  /** First output row to compute (default 0); rows outside [rowStart, rowEnd) of `out` are left untouched. */
  rowStart?: number;
  /** One past the last output row to compute (default map.height). */
  rowEnd?: number;
  /** 'area' filter: most probes along a footprint's long axis (default 8); coarser levels take the rest. */
  maxSamples?: number;
  /**
   * 'area' filter: the source's mip pyramid from buildPyramid(src), when one frame is remapped in
   * several calls (row bands) and should reduce the source once. Without it each call builds the
   * levels it needs into scratch memory kept between calls.
   */
  pyramid?: SourcePyramid;
  /**
   * 'bilinear' filter: the map prepared by prepareBilinear(map, src.width, src.height,
   * src.channels), for fixed-point sampling (bilinear-fixed.ts: within 8 code values of the float
   * kernel, most often equal); without it the float kernel runs.
   */
  prepared?: PreparedBilinear;
  /**
   * 'area' filter: the map's footprints from prepareArea(map, src.width, src.height, maxSamples),
   * worked out once for every frame of a run; the same pixels as without it, sooner (3- and
   * 4-channel sources; others ignore it).
   */
  areaPlan?: PreparedArea;
  /**
   * Scale colour in linear light, decoding and re-encoding sRGB (default true, DESIGN.md
   * "Brightness"); false scales code values directly, for data that is already linear.
   */
  linearGain?: boolean;
}

/** The defaults of RemapOptions, in one place for the CLI to share. */
export const REMAP_DEFAULTS = {
  filter: 'area' as RemapFilter,
  maxSamples: 8,
  linearGain: true,
} as const;

const FILTERS: readonly RemapFilter[] = ['nearest', 'bilinear', 'area'];

/**
 * Gathers src through map: output pixel k takes the source sampled at (map.x[k], map.y[k]) with
 * the chosen filter (code values interpolated, common practice for remapping), then its colour
 * channels scaled by map.gain[k] in linear light. Alpha (the last channel of 2- and 4-channel
 * images) is sampled like colour but never gamma-converted nor scaled, except that gain 0 makes
 * the pixel black with alpha 0. A map point outside the source rectangle [0, W) × [0, H), or NaN,
 * is black with alpha 0.
 *
 * The hot loops allocate nothing: pass `out` to reuse memory, and rowStart/rowEnd to split the
 * output into bands across workers. Throws on malformed inputs.
 */
export function remap(src: ImageBuffer, map: RemapMap, options: RemapOptions = {}): ImageBuffer {
  checkImage(src, 'src');
  checkMap(map);
  const filter = options.filter ?? REMAP_DEFAULTS.filter;
  if (!FILTERS.includes(filter)) {
    throw new Error(`Expected one of ${FILTERS.join(', ')} for options.filter but received ${String(filter)}`);
  }
  const maxSamples = options.maxSamples ?? REMAP_DEFAULTS.maxSamples;
  if (!Number.isInteger(maxSamples) || maxSamples < 1) {
    throw new Error(`Expected integer ≥ 1 for options.maxSamples but received ${maxSamples}`);
  }
  const rowStart = options.rowStart ?? 0;
  const rowEnd = options.rowEnd ?? map.height;
  if (!Number.isInteger(rowStart) || rowStart < 0 || rowStart > map.height) {
    throw new Error(`Expected integer in [0, ${map.height}] for options.rowStart but received ${rowStart}`);
  }
  if (!Number.isInteger(rowEnd) || rowEnd < rowStart || rowEnd > map.height) {
    throw new Error(`Expected integer in [${rowStart}, ${map.height}] for options.rowEnd but received ${rowEnd}`);
  }
  const out = options.out ?? createImageLike(src, map.width, map.height);
  if (options.out) {
    checkImage(out, 'options.out');
    if (out.width !== map.width || out.height !== map.height || out.channels !== src.channels) {
      throw new Error(
        `Expected ${map.width}×${map.height}×${src.channels} for options.out but received ` +
          `${out.width}×${out.height}×${out.channels}`,
      );
    }
    if (out.data.BYTES_PER_ELEMENT !== src.data.BYTES_PER_ELEMENT) {
      throw new Error(`Expected ${depthName(src)} data for options.out but received ${depthName(out)}`);
    }
    if (out.data.buffer === src.data.buffer) {
      throw new Error('Expected options.out to use memory separate from src');
    }
  }
  const linearGain = options.linearGain ?? REMAP_DEFAULTS.linearGain;
  const sixteen = src.data instanceof Uint16Array;
  const levels = filter === 'area' ? areaLevels(src, options.pyramid) : undefined;
  const fixed = filter === 'bilinear' ? checkPrepared(options.prepared, src, map) : undefined;
  const plan = filter === 'area' && (src.channels === 3 || src.channels === 4) ? checkAreaPlan(options.areaPlan, src, map, maxSamples) : undefined;
  for (let j = rowStart; j < rowEnd; j++) {
    let scaled: boolean;
    if (fixed) scaled = bilinearFixedRow(src.data as Uint8Array, fixed, out.data as Uint8Array, j);
    else if (filter === 'bilinear') scaled = bilinearRow(src, map, out, j);
    else if (filter === 'nearest') scaled = nearestRow(src, map, out, j);
    else if (plan) scaled = areaRowPlanned(levels!, plan, map, out, j);
    else scaled = areaRow(levels!, map, out, j, maxSamples);
    // Scale the row while it is still in cache; a mask-only row (gains 0 and 1) is already final.
    if (!scaled) continue;
    if (!linearGain) gainRowCodes(out, map.gain, j);
    else if (sixteen) gainRow16(out.data as Uint16Array, out.channels, map.gain, j * map.width, map.width);
    else gainRow8(out.data as Uint8Array, out.channels, map.gain, j * map.width, map.width);
  }
  return out;
}

// Levels 1 and up and the half level of the last source reduced in JavaScript, reused by the next call.
const scratchLevels: ImageBuffer[] = [];
const scratchHalf: { image?: ImageBuffer } = {};

function areaLevels(src: ImageBuffer, pyramid: SourcePyramid | undefined): AreaLevels {
  const top = pyramidDepth(src.width, src.height) - 1;
  let levels = [src];
  let half: ImageBuffer | undefined;
  if (pyramid) {
    const given = pyramid.levels;
    if (!Array.isArray(given) || given[0]?.data !== src.data) {
      throw new Error('Expected options.pyramid built from src (levels[0] is src)');
    }
    const check = (g: ImageBuffer, w: number, h: number, name: string) => {
      if (g.width !== w || g.height !== h || g.channels !== src.channels || g.data.constructor !== src.data.constructor || g.data.length !== w * h * src.channels) {
        throw new Error(`Expected ${w}×${h}×${src.channels} ${depthName(src)} for options.pyramid.${name}`);
      }
    };
    let w = src.width;
    let h = src.height;
    for (let l = 1; l < given.length; l++) {
      w = (w + 1) >> 1;
      h = (h + 1) >> 1;
      check(given[l], w, h, `levels[${l}]`);
    }
    if (pyramid.half) check(pyramid.half, src.width, src.height, 'half');
    levels = given.slice();
    half = pyramid.half;
  }
  // Levels not given are made on demand: 8-bit ones in WebAssembly when it is there (the whole
  // pyramid's room reserved at the first), others in JavaScript, into scratch memory without a
  // pyramid and into new memory with one (which the caller's pyramid lacked).
  let fast: WasmLevels | null | undefined = pyramid ? null : undefined;
  const wasm = () => (fast === undefined ? (fast = WasmLevels.create(src, top + 1)) : fast);
  const lv: AreaLevels = {
    levels,
    built: levels.length,
    top,
    half,
    make: (l) => {
      const k = wasm();
      if (k) return k.level(l);
      const made = reduceLevel(lv.levels[l - 1], pyramid ? undefined : scratchLevels[l]);
      if (!pyramid) scratchLevels[l] = made;
      return made;
    },
    makeHalf: () => {
      const k = wasm();
      if (k) return k.half();
      const made = halfLevel(src, pyramid ? undefined : scratchHalf.image);
      if (!pyramid) scratchHalf.image = made;
      return made;
    },
  };
  return lv;
}

/** An ImageBuffer of the given size with the channels and depth of `like`, zero-filled. */
export function createImageLike(like: ImageBuffer, width: number, height: number): ImageBuffer {
  const n = width * height * like.channels;
  const data = like.data instanceof Uint16Array ? new Uint16Array(n) : new Uint8Array(n);
  return { width, height, channels: like.channels, data };
}

// Gain 0 (and ≤ 0, NaN) is already black in the sampled row, and gain 1 leaves the code untouched.
/** Gains below 1 are quantised to this many steps for the 8-bit table (an error under 0.13 code). */
const GAIN_STEPS8 = 1023;
let gainTable8: Uint8Array | undefined;

/**
 * (gain step, code) → code in linear light, for gains in [0, 1]: one lookup per channel instead of
 * decode, scale and encode. Built once, from the same decode/encode tables as the exact path.
 */
function gainLut8(): Uint8Array {
  if (gainTable8) return gainTable8;
  const dec = srgbDecodeLut8();
  const enc = srgbEncodeLut8();
  const top = SRGB_ENCODE8_STEPS;
  const t = new Uint8Array((GAIN_STEPS8 + 1) * 256);
  for (let l = 0; l <= GAIN_STEPS8; l++) {
    const scale = (l / GAIN_STEPS8) * top;
    for (let c = 0; c < 256; c++) {
      const q = (dec[c] * scale + 0.5) | 0;
      t[(l << 8) | c] = enc[q < top ? q : top];
    }
  }
  gainTable8 = t;
  return t;
}

function gainRow8(o: Uint8Array, C: number, mg: Float32Array, k0: number, w: number): void {
  const dec = srgbDecodeLut8();
  const enc = srgbEncodeLut8();
  const lut = gainLut8();
  const colour = C === 2 || C === 4 ? C - 1 : C; // 1 or 3
  const top = SRGB_ENCODE8_STEPS;
  for (let i = 0, k = k0, oi = k0 * C; i < w; i++, k++, oi += C) {
    const g = mg[k];
    if (g === 1 || !(g > 0)) continue;
    if (g < 1) {
      const base = ((g * GAIN_STEPS8 + 0.5) | 0) << 8;
      o[oi] = lut[base | o[oi]];
      if (colour === 3) {
        o[oi + 1] = lut[base | o[oi + 1]];
        o[oi + 2] = lut[base | o[oi + 2]];
      }
      continue;
    }
    // gains above 1 (the simulation's physical brightness): decode, scale, encode, clipped
    const scale = g * top;
    for (let ch = 0; ch < colour; ch++) {
      const t = (dec[o[oi + ch]] * scale + 0.5) | 0;
      o[oi + ch] = enc[t < top ? t : top];
    }
  }
}

function gainRow16(o: Uint16Array, C: number, mg: Float32Array, k0: number, w: number): void {
  const dec = srgbDecodeLut16();
  const enc = srgbEncodeLut16();
  const colour = C === 2 || C === 4 ? C - 1 : C;
  const top = SRGB_ENCODE16_STEPS;
  for (let i = 0, k = k0, oi = k0 * C; i < w; i++, k++, oi += C) {
    const g = mg[k];
    if (g === 1 || !(g > 0)) continue;
    const scale = g * top;
    for (let ch = 0; ch < colour; ch++) {
      let t = dec[o[oi + ch]] * scale;
      if (t > top) t = top;
      const n = t | 0;
      const a = enc[n];
      o[oi + ch] = a + (t - n) * (enc[n + 1] - a) + 0.5;
    }
  }
}

function gainRowCodes(out: ImageBuffer, mg: Float32Array, j: number): void {
  const o = out.data;
  const C = out.channels;
  const colour = C === 2 || C === 4 ? C - 1 : C;
  const max = o instanceof Uint16Array ? 65535 : 255;
  const w = out.width;
  for (let i = 0, k = j * w, oi = k * C; i < w; i++, k++, oi += C) {
    const g = mg[k];
    if (g === 1 || !(g > 0)) continue;
    for (let ch = 0; ch < colour; ch++) {
      const v = o[oi + ch] * g + 0.5;
      o[oi + ch] = v < max ? v : max;
    }
  }
}

function checkPrepared(p: PreparedBilinear | undefined, src: ImageBuffer, map: RemapMap): PreparedBilinear | undefined {
  if (!p) return undefined;
  if (p.map !== map || p.srcWidth !== src.width || p.srcHeight !== src.height || p.channels !== src.channels || !(src.data instanceof Uint8Array)) {
    throw new Error(
      `Expected options.prepared made from this map for an 8-bit ${src.width}×${src.height}×${src.channels} source but it was made for ` +
        `${p.srcWidth}×${p.srcHeight}×${p.channels}${p.map !== map ? ' from another map' : ''}`,
    );
  }
  return p;
}

/**
 * The 'area' filter's footprints of `map` for a srcWidth × srcHeight source, worked out once (pass
 * as options.areaPlan to every remap of that map; 12 bytes per output pixel and 16 more per pixel
 * with several probes: 42 MiB for the demo rig at 1920 × 1200).
 */
export function prepareArea(map: RemapMap, srcWidth: number, srcHeight: number, maxSamples: number = REMAP_DEFAULTS.maxSamples): PreparedArea {
  checkMap(map);
  if (!Number.isInteger(srcWidth) || !Number.isInteger(srcHeight) || srcWidth < 1 || srcHeight < 1) {
    throw new Error(`Expected positive integer source size but received ${srcWidth}×${srcHeight}`);
  }
  if (!Number.isInteger(maxSamples) || maxSamples < 1 || maxSamples > 65535) {
    throw new Error(`Expected integer in [1, 65535] for maxSamples but received ${maxSamples}`);
  }
  return planArea(map, srcWidth, srcHeight, maxSamples, pyramidDepth(srcWidth, srcHeight) - 1);
}

function checkAreaPlan(p: PreparedArea | undefined, src: ImageBuffer, map: RemapMap, maxSamples: number): PreparedArea | undefined {
  if (!p) return undefined;
  if (p.map !== map || p.srcWidth !== src.width || p.srcHeight !== src.height || p.maxSamples !== maxSamples) {
    throw new Error(
      `Expected options.areaPlan made from this map for a ${src.width}×${src.height} source with maxSamples ${maxSamples} but it was made for ` +
        `${p.srcWidth}×${p.srcHeight} with maxSamples ${p.maxSamples}${p.map !== map ? ' from another map' : ''}`,
    );
  }
  return p;
}

function checkImage(img: ImageBuffer, name: string): void {
  if (![1, 2, 3, 4].includes(img.channels)) {
    throw new Error(`Expected 1, 2, 3 or 4 for ${name}.channels but received ${img.channels}`);
  }
  if (!Number.isInteger(img.width) || !Number.isInteger(img.height) || img.width < 1 || img.height < 1) {
    throw new Error(`Expected positive integer size for ${name} but received ${img.width}×${img.height}`);
  }
  if (!(img.data instanceof Uint8Array || img.data instanceof Uint16Array)) {
    throw new Error(`Expected Uint8Array or Uint16Array for ${name}.data`);
  }
  const n = img.width * img.height * img.channels;
  if (img.data.length !== n) {
    throw new Error(`Expected ${n} samples for ${name}.data but received ${img.data.length}`);
  }
}

function checkMap(map: RemapMap): void {
  if (!Number.isInteger(map.width) || !Number.isInteger(map.height) || map.width < 0 || map.height < 0) {
    throw new Error(`Expected non-negative integer size for map but received ${map.width}×${map.height}`);
  }
  const n = map.width * map.height;
  for (const key of ['x', 'y', 'gain'] as const) {
    const a = map[key];
    if (!(a instanceof Float32Array) || a.length !== n) {
      throw new Error(`Expected Float32Array of ${n} for map.${key} but received ${describe(a)}`);
    }
  }
}

function describe(a: unknown): string {
  if (ArrayBuffer.isView(a)) return `${a.constructor.name} of ${(a as Float32Array).length}`;
  return a === undefined ? 'undefined' : typeof a;
}

function depthName(img: ImageBuffer): string {
  return img.data instanceof Uint16Array ? '16-bit' : '8-bit';
}
