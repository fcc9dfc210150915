/**
 * Colour maps for the report's pictures. "dusk" is skyfold's own sequential map, designed in OKLab
 * (Björn Ottosson, "A perceptual color space for image processing", 2020): lightness rises linearly
 * from dark violet through blue, teal and green to pale yellow, so equal steps in value look like
 * equal steps in lightness and the map stays ordered in grey scale. Chroma is reduced where sRGB
 * cannot show it, which never changes the lightness.
 */
import { linearToSrgb } from '@skyfold/warp-core';

/** An 8-bit sRGB colour. */
export type Rgb8 = readonly [number, number, number];

/** The colour as CSS/SVG writes it: #rrggbb. */
export function css(c: Rgb8): string {
  return '#' + c.map((v) => Math.round(Math.min(255, Math.max(0, v))).toString(16).padStart(2, '0')).join('');
}

/** OKLab → linear sRGB (Ottosson 2020, the matrices as published on 2021-01-25). */
export function oklabToLinearSrgb(L: number, a: number, b: number): [number, number, number] {
  const l_ = L + 0.3963377774 * a + 0.2158037573 * b;
  const m_ = L - 0.1055613458 * a - 0.0638541728 * b;
  const s_ = L - 0.0894841775 * a - 1.291485548 * b;
  const l = l_ * l_ * l_;
  const m = m_ * m_ * m_;
  const s = s_ * s_ * s_;
  return [
    4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s,
    -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s,
    -0.0041960863 * l - 0.7034186147 * m + 1.707614701 * s,
  ];
}

/** OKLCh (lightness, chroma, hue in degrees) → 8-bit sRGB, reducing chroma until the colour fits sRGB. */
export function oklchToSrgb8(L: number, C: number, hDeg: number): [number, number, number] {
  const h = (hDeg * Math.PI) / 180;
  const fits = (c: number) => oklabToLinearSrgb(L, c * Math.cos(h), c * Math.sin(h)).every((x) => x >= -1e-4 && x <= 1 + 1e-4);
  let c = C;
  if (!fits(c)) {
    let lo = 0;
    let hi = C;
    for (let k = 0; k < 30; k++) {
      const mid = 0.5 * (lo + hi);
      if (fits(mid)) lo = mid;
      else hi = mid;
    }
    c = lo;
  }
  const rgb = oklabToLinearSrgb(L, c * Math.cos(h), c * Math.sin(h));
  return [0, 1, 2].map((i) => Math.round(255 * linearToSrgb(Math.min(1, Math.max(0, rgb[i]))))) as [number, number, number];
}

function buildDusk(): Uint8Array {
  const lut = new Uint8Array(256 * 3);
  for (let k = 0; k < 256; k++) {
    const t = k / 255;
    const L = 0.24 + 0.7 * t;
    const C = 0.085 + 0.075 * Math.sin(Math.PI * Math.min(1, t * 1.1));
    const hue = 292 - 197 * t; // violet → blue → teal → green → yellow
    const [r, g, b] = oklchToSrgb8(L, C, hue);
    lut[3 * k] = r;
    lut[3 * k + 1] = g;
    lut[3 * k + 2] = b;
  }
  return lut;
}

let duskLut: Uint8Array | undefined;

/** skyfold's "dusk" sequential map at t ∈ [0, 1] (clamped): dark = low, light = high. */
export function dusk(t: number): Rgb8 {
  duskLut ??= buildDusk();
  const k = Math.round(255 * (t < 0 ? 0 : t > 1 ? 1 : Number.isFinite(t) ? t : 0));
  return [duskLut[3 * k], duskLut[3 * k + 1], duskLut[3 * k + 2]];
}

/** OKLab lightness of an 8-bit sRGB colour (for tests: the map must rise monotonically). */
export function oklabLightness(c: Rgb8): number {
  const lin = c.map((v) => {
    const x = v / 255;
    return x <= 0.04045 ? x / 12.92 : Math.pow((x + 0.055) / 1.055, 2.4);
  });
  const l = 0.4122214708 * lin[0] + 0.5363325363 * lin[1] + 0.0514459929 * lin[2];
  const m = 0.2119034982 * lin[0] + 0.6806995451 * lin[1] + 0.1073969566 * lin[2];
  const s = 0.0883024619 * lin[0] + 0.2817188376 * lin[1] + 0.6299787005 * lin[2];
  return 0.2104542553 * Math.cbrt(l) + 0.793617785 * Math.cbrt(m) - 0.0040720468 * Math.cbrt(s);
}

/** The report's own palette for what a projector pixel's light does, and for drawing. */
export const PALETTE = {
  lit: oklchToSrgb8(0.74, 0.11, 170),
  litDark: oklchToSrgb8(0.52, 0.09, 170),
  outsideContent: oklchToSrgb8(0.62, 0.025, 250),
  belowHorizon: oklchToSrgb8(0.72, 0.15, 60),
  mirrorMiss: oklchToSrgb8(0.3, 0.01, 260),
  shadow: oklchToSrgb8(0.55, 0.17, 350),
  caution: oklchToSrgb8(0.58, 0.2, 28),
  ink: [34, 37, 46] as Rgb8,
  faint: [120, 126, 138] as Rgb8,
  paper: [250, 250, 247] as Rgb8,
  unlit: [214, 216, 220] as Rgb8,
  beam: oklchToSrgb8(0.8, 0.15, 95),
} as const;
