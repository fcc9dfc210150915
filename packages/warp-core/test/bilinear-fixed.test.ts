/**
 * Fixed-point bilinear (bilinear-fixed.ts) against the float kernel (bilinear.ts), the reference:
 * identical where the map's fractions are multiples of 1/32 pixel (the fixed weights are exact
 * there), and elsewhere within the documented bound of one code for rounding plus 1/64 of the steps
 * to the neighbours in x and in y, on a source with hard edges and noise.
 */
import { describe, expect, it } from 'vitest';
import { prepareBilinear } from '../src/remap/bilinear-fixed.js';
import { createImageLike, remap } from '../src/remap/remap.js';
import type { ImageBuffer, RemapMap } from '../src/remap/types.js';

/** Deterministic pseudo-random numbers in [0, 1) (a 32-bit LCG, Numerical Recipes' constants). */
function rng(seed: number) {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296);
}

/** Hard-edged blocks plus noise, so neighbouring samples differ by anything up to 255. */
function source(w: number, h: number, c: 3 | 4, seed: number): ImageBuffer {
  const r = rng(seed);
  const data = new Uint8Array(w * h * c);
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++)
      for (let ch = 0; ch < c; ch++) data[(y * w + x) * c + ch] = ((x >> 2) + (y >> 3) + ch) % 2 ? 200 + ((r() * 55) | 0) : (r() * 40) | 0;
  return { width: w, height: h, channels: c, data };
}

/** Points all over [-2, W+2) × [-2, H+2), edges included, some NaN and some with gain 0 or < 1. */
function randomMap(w: number, h: number, W: number, H: number, seed: number, quantum?: number): RemapMap {
  const r = rng(seed);
  const n = w * h;
  const x = new Float32Array(n);
  const y = new Float32Array(n);
  const gain = new Float32Array(n);
  const q = (v: number) => (quantum ? Math.round(v / quantum) * quantum : v);
  for (let k = 0; k < n; k++) {
    x[k] = q(-2 + r() * (W + 4));
    y[k] = q(-2 + r() * (H + 4));
    if (k % 17 === 0) x[k] = r() < 0.5 ? 0 : W - 0.25; // the edges themselves
    if (k % 29 === 0) y[k] = r() < 0.5 ? 0.25 : H - 0.5;
    gain[k] = k % 13 === 0 ? 0 : k % 7 === 0 ? 0.25 + 0.5 * r() : 1;
    if (k % 31 === 0) x[k] = Number.NaN;
  }
  return { width: w, height: h, x, y, gain };
}

/** The documented bound at output pixel k: 1 + (largest x step + largest y step among its neighbours) / 64. */
function bound(src: ImageBuffer, map: RemapMap, k: number, ch: number): number {
  const { width: W, height: H, channels: C, data: s } = src;
  const cl = (v: number, hi: number) => (v < 0 ? 0 : v > hi ? hi : v);
  const x0 = Math.floor(map.x[k] - 0.5);
  const y0 = Math.floor(map.y[k] - 0.5);
  const at = (x: number, y: number) => s[(cl(y, H - 1) * W + cl(x, W - 1)) * C + ch];
  const dx = Math.max(Math.abs(at(x0 + 1, y0) - at(x0, y0)), Math.abs(at(x0 + 1, y0 + 1) - at(x0, y0 + 1)));
  const dy = Math.max(Math.abs(at(x0, y0 + 1) - at(x0, y0)), Math.abs(at(x0 + 1, y0 + 1) - at(x0 + 1, y0)));
  return 1 + (dx + dy) / 64;
}

describe('fixed-point bilinear', () => {
  for (const c of [3, 4] as const) {
    it(`equals the float kernel where fractions are multiples of 1/32 (${c} channels)`, () => {
      const src = source(37, 23, c, 5);
      const map = randomMap(41, 19, 37, 23, 6 + c, 1 / 32);
      const p = prepareBilinear(map, 37, 23, c);
      const a = remap(src, map, { filter: 'bilinear' });
      const b = remap(src, map, { filter: 'bilinear', prepared: p });
      expect(Array.from(b.data)).toEqual(Array.from(a.data));
    });

    it(`stays within the documented bound of the float kernel elsewhere (${c} channels)`, () => {
      const src = source(64, 48, c, 9);
      const map = randomMap(80, 60, 64, 48, 10 + c);
      const p = prepareBilinear(map, 64, 48, c);
      // mask-only gain here, so the bound applies to the sampled codes themselves
      const mask = { ...map, gain: map.gain.map((g) => (g > 0 ? 1 : 0)) };
      const pm = prepareBilinear(mask, 64, 48, c);
      const a = remap(src, mask, { filter: 'bilinear' });
      const b = remap(src, mask, { filter: 'bilinear', prepared: pm });
      let differ = 0;
      for (let k = 0; k < mask.x.length; k++) {
        for (let ch = 0; ch < c; ch++) {
          const d = Math.abs(a.data[k * c + ch] - b.data[k * c + ch]);
          if (d === 0) continue; // (outside points are black in both; their bound is undefined)
          differ++;
          expect(d).toBeLessThanOrEqual(bound(src, mask, k, ch));
        }
      }
      // the bound is not vacuous: rounding the fraction does change some samples
      expect(differ).toBeGreaterThan(0);
      // with the gain, the same pixels are black and the rest scaled alike (within the bound, scaled)
      const g1 = remap(src, map, { filter: 'bilinear' });
      const g2 = remap(src, map, { filter: 'bilinear', prepared: p });
      for (let k = 0; k < map.x.length; k++) {
        for (let ch = 0; ch < c; ch++) {
          const d = Math.abs(g1.data[k * c + ch] - g2.data[k * c + ch]);
          if (!(map.gain[k] > 0)) expect(g2.data[k * c + ch]).toBe(0);
          else if (d > 0) expect(d).toBeLessThanOrEqual(bound(src, mask, k, ch) + 1);
        }
      }
    });
  }

  it('fills only the rows asked for', () => {
    const src = source(20, 20, 3, 1);
    const map = randomMap(10, 8, 20, 20, 2);
    const p = prepareBilinear(map, 20, 20, 3);
    const out = createImageLike(src, 10, 8);
    out.data.fill(7);
    remap(src, map, { filter: 'bilinear', prepared: p, out, rowStart: 2, rowEnd: 5 });
    const whole = remap(src, map, { filter: 'bilinear', prepared: p });
    for (let k = 0; k < 80 * 3; k++) expect(out.data[k]).toBe(k >= 2 * 30 && k < 5 * 30 ? whole.data[k] : 7);
  });

  it('refuses a preparation for another map or source', () => {
    const src = source(20, 20, 3, 1);
    const map = randomMap(10, 8, 20, 20, 2);
    const other = randomMap(10, 8, 20, 20, 3);
    expect(() => remap(src, map, { filter: 'bilinear', prepared: prepareBilinear(map, 21, 20, 3) })).toThrow(
      'Expected options.prepared made from this map for an 8-bit 20×20×3 source but it was made for 21×20×3',
    );
    expect(() => remap(src, map, { filter: 'bilinear', prepared: prepareBilinear(other, 20, 20, 3) })).toThrow('from another map');
    expect(() => prepareBilinear(map, 1, 20, 3)).toThrow('Expected a source of at least 2×2 but received 1×20');
  });
});
