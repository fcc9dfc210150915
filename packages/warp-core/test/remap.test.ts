import { describe, expect, it } from 'vitest';
import { buildPyramid } from '../src/remap/pyramid.js';
import { createImageLike, remap } from '../src/remap/remap.js';
import { linearToSrgb, srgbToLinear } from '../src/srgb.js';
import { type ImageBuffer, type RemapFilter, type RemapMap } from '../src/remap/types.js';

const FILTERS: RemapFilter[] = ['nearest', 'bilinear', 'area'];

function image(width: number, height: number, channels: 1 | 2 | 3 | 4, values: number[] | ((k: number) => number), bits: 8 | 16 = 8): ImageBuffer {
  const n = width * height * channels;
  const data = bits === 16 ? new Uint16Array(n) : new Uint8Array(n);
  for (let k = 0; k < n; k++) data[k] = typeof values === 'function' ? values(k) : values[k];
  return { width, height, channels, data };
}

/** A map of the given size from a function of the output pixel (i, j) to source coordinates. */
function mapOf(width: number, height: number, f: (i: number, j: number) => [number, number], gain = 1): RemapMap {
  const n = width * height;
  const map = { width, height, x: new Float32Array(n), y: new Float32Array(n), gain: new Float32Array(n).fill(gain) };
  for (let j = 0; j < height; j++) {
    for (let i = 0; i < width; i++) {
      const [x, y] = f(i, j);
      map.x[j * width + i] = x;
      map.y[j * width + i] = y;
    }
  }
  return map;
}

/** A 1×n map through the given points. */
function points(pts: [number, number][], gain = 1): RemapMap {
  return mapOf(pts.length, 1, (i) => pts[i], gain);
}

/** Deterministic pseudo-random code values (a small LCG). */
function noise(max: number, seed = 7): (k: number) => number {
  let s = seed;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s % (max + 1);
  };
}

describe('remap: nearest', () => {
  it('picks the pixel whose square holds the point', () => {
    // 3×2 grey: pixel (p, q) covers [p, p+1) × [q, q+1).
    const src = image(3, 2, 1, [10, 20, 30, 40, 50, 60]);
    const out = remap(src, points([[0.2, 0.9], [2.99, 1.5], [1, 1], [0.999, 0], [2.5, 0.5]]), { filter: 'nearest' });
    expect([...out.data]).toEqual([10, 60, 50, 10, 30]);
  });
});

describe('remap: bilinear', () => {
  // 2×2 grey; centres at (0.5, 0.5), (1.5, 0.5), (0.5, 1.5), (1.5, 1.5).
  const src = image(2, 2, 1, [10, 20, 30, 60]);

  it('blends the four centres with the hand-computed weights', () => {
    const out = remap(src, points([[1, 1], [0.75, 0.75], [1.5, 0.5], [1.25, 1.5], [0.5, 1.0]]), { filter: 'bilinear' });
    // (1, 1): fractions (0.5, 0.5), all four weights 1/4 → 30.
    // (0.75, 0.75): fractions (0.25, 0.25), weights 9/16, 3/16, 3/16, 1/16 → 18.75 → 19.
    // (1.5, 0.5): exactly on a centre → 20. (1.25, 1.5): 30 + 0.75·30 = 52.5 → 53 (half rounds up).
    // (0.5, 1.0): halfway between 10 and 30 → 20.
    expect([...out.data]).toEqual([30, 19, 20, 53, 20]);
  });

  it('clamps neighbour indices near the border', () => {
    const out = remap(src, points([[0.1, 0.1], [1.9, 0.2], [0.2, 1.99], [1.99, 1.99], [1.75, 1]]), { filter: 'bilinear' });
    // Beyond the outer centres only the edge pixels count; (1.75, 1): x clamps, y halfway → (20+60)/2.
    expect([...out.data]).toEqual([10, 20, 30, 60, 40]);
  });

  it('averages neighbours under a half-pixel shift', () => {
    const src8 = image(9, 4, 3, noise(255));
    const shifted = mapOf(8, 3, (i, j) => [i + 1, j + 1]); // corners of source pixels
    const out = remap(src8, shifted, { filter: 'bilinear' });
    const s = src8.data;
    for (let j = 0; j < 3; j++) {
      for (let i = 0; i < 8; i++) {
        for (let c = 0; c < 3; c++) {
          const at = (p: number, q: number) => s[(q * 9 + p) * 3 + c];
          const mean = (at(i, j) + at(i + 1, j) + at(i, j + 1) + at(i + 1, j + 1)) / 4;
          expect(out.data[(j * 8 + i) * 3 + c]).toBe(Math.floor(mean + 0.5));
        }
      }
    }
  });

  it('works on 16-bit samples', () => {
    const src16 = image(2, 1, 1, [1000, 3000], 16);
    const out = remap(src16, points([[1, 0.5], [1.25, 0.5], [0.5, 0.5]]), { filter: 'bilinear' });
    expect(out.data).toBeInstanceOf(Uint16Array);
    expect([...out.data]).toEqual([2000, 2500, 1000]);
  });
});

describe('remap: all filters', () => {
  it('reproduce the image exactly under the identity map (1–4 channels, 8 and 16 bits)', () => {
    for (const bits of [8, 16] as const) {
      for (const channels of [1, 2, 3, 4] as const) {
        const src = image(7, 5, channels, noise(bits === 8 ? 255 : 65535, channels), bits);
        const identity = mapOf(7, 5, (i, j) => [i + 0.5, j + 0.5]);
        for (const filter of FILTERS) {
          const out = remap(src, identity, { filter });
          expect(out.channels).toBe(channels);
          expect(out.data.constructor).toBe(src.data.constructor);
          expect([...out.data], `${filter} ${channels}ch ${bits}-bit`).toEqual([...src.data]);
        }
      }
    }
  });

  it('give black with alpha 0 outside the source rectangle or at NaN', () => {
    const src = image(3, 3, 4, (k) => (k % 4 === 3 ? 255 : 200));
    const map = points([[-0.01, 1], [3, 1], [1, 3], [1, -1e-6], [Number.NaN, 1], [1, Number.NaN], [2.999, 2.999]]);
    for (const filter of FILTERS) {
      const out = remap(src, map, { filter });
      expect([...out.data.subarray(0, 24)], filter).toEqual(new Array(24).fill(0));
      expect([...out.data.subarray(24)], filter).toEqual([200, 200, 200, 255]);
    }
  });

  it('preserve alpha', () => {
    // Grey + alpha: alpha interpolates like colour.
    const src = image(2, 1, 2, [100, 0, 200, 255]);
    for (const filter of FILTERS) {
      const out = remap(src, points([[0.5, 0.5], [1.5, 0.5]]), { filter });
      expect([...out.data], filter).toEqual([100, 0, 200, 255]);
    }
    const out = remap(src, points([[1, 0.5]]), { filter: 'bilinear' });
    expect([...out.data]).toEqual([150, 128]); // 127.5 rounds up
  });
});

describe('remap: gain', () => {
  it('scales colour in linear light (IEC 61966-2-1) and leaves alpha alone', () => {
    // Code 128 decodes to 0.215861 linear; half of it encodes to 92.37 → 92 (not 64).
    const expected = Math.round(linearToSrgb(srgbToLinear(128 / 255) * 0.5) * 255);
    expect(expected).toBe(92);
    const src = image(1, 1, 4, [128, 128, 128, 77]);
    for (const filter of FILTERS) {
      const out = remap(src, points([[0.5, 0.5]], 0.5), { filter });
      expect([...out.data], filter).toEqual([92, 92, 92, 77]);
    }
    const grey = remap(image(1, 1, 2, [128, 77]), points([[0.5, 0.5]], 0.5), { filter: 'nearest' });
    expect([...grey.data]).toEqual([92, 77]);
  });

  it('scales 16-bit colour through the 16-bit tables', () => {
    const src = image(1, 1, 3, [32768, 32768, 32768], 16);
    const exact = linearToSrgb(srgbToLinear(32768 / 65535) * 0.5) * 65535; // 23644.1
    const out = remap(src, points([[0.5, 0.5]], 0.5), { filter: 'bilinear' });
    for (const v of out.data) expect(Math.abs(v - exact)).toBeLessThanOrEqual(1);
  });

  it('gain 0 is black with alpha 0; gain 1 is untouched; gain > 1 saturates', () => {
    const src = image(1, 1, 4, [128, 64, 32, 200]);
    const map = points([[0.5, 0.5], [0.5, 0.5], [0.5, 0.5]]);
    map.gain.set([0, 1, 10]);
    const out = remap(src, map, { filter: 'nearest' });
    expect([...out.data.subarray(0, 8)]).toEqual([0, 0, 0, 0, 128, 64, 32, 200]);
    expect(out.data[8]).toBe(255);
    expect(out.data[11]).toBe(200);
  });

  it('scales code values directly with linearGain: false', () => {
    const src = image(1, 1, 2, [201, 90]);
    const out = remap(src, points([[0.5, 0.5]], 0.5), { filter: 'bilinear', linearGain: false });
    expect([...out.data]).toEqual([101, 90]); // 100.5 rounds up
  });
});

describe('remap: area', () => {
  it('equals bilinear where the map magnifies', () => {
    const src = image(8, 8, 3, noise(255, 3));
    const zoom = mapOf(20, 17, (i, j) => [1.3 + (i + 0.5) * 0.31, 0.7 + (j + 0.5) * 0.4 + (i + 0.5) * 0.05]);
    const a = remap(src, zoom, { filter: 'area' });
    const b = remap(src, zoom, { filter: 'bilinear' });
    expect([...a.data]).toEqual([...b.data]);
  });

  it('anti-aliases a minified checkerboard to mean grey where nearest aliases', () => {
    // 1-pixel checkerboard, reduced about 7.3× along a slight rotation.
    const N = 240;
    const src = image(N, N, 1, (k) => (((k % N) + Math.floor(k / N)) % 2 === 0 ? 0 : 255));
    const size = 30;
    const scale = 7.3;
    const c = Math.cos(0.1);
    const s = Math.sin(0.1);
    const minify = mapOf(size, size, (i, j) => {
      const u = (i + 0.5 - size / 2) * scale;
      const v = (j + 0.5 - size / 2) * scale;
      return [N / 2 + c * u - s * v, N / 2 + s * u + c * v];
    });
    const stats = (img: ImageBuffer) => {
      let sum = 0;
      let sq = 0;
      for (const v of img.data) {
        sum += v;
        sq += (v - 127.5) ** 2;
      }
      return { mean: sum / img.data.length, rms: Math.sqrt(sq / img.data.length) };
    };
    const area = stats(remap(src, minify, { filter: 'area' }));
    const nearest = stats(remap(src, minify, { filter: 'nearest' }));
    expect(Math.abs(area.mean - 127.5)).toBeLessThan(2);
    expect(area.rms).toBeLessThan(8); // every pixel close to grey
    expect(nearest.rms).toBeGreaterThan(100); // pixels are 0 or 255
    // Bilinear takes one sample per pixel and aliases too.
    const bilinear = stats(remap(src, minify, { filter: 'bilinear' }));
    expect(bilinear.rms).toBeGreaterThan(30);
    // One probe per pixel still reads a level coarse enough for the whole footprint: no aliasing.
    const capped = stats(remap(src, minify, { filter: 'area', maxSamples: 1 }));
    expect(capped.rms).toBeLessThan(8);
  });
});

describe('remap: area on the pyramid', () => {
  // A minifying, anisotropic, rotated and slightly curved map: footprints 2–6 source pixels long
  // and 1.5–3 wide, so probe counts and pyramid levels vary across the frame.
  const SIZE = 320;
  const OW = 48;
  const OH = 40;
  const warp = (u: number, v: number): [number, number] => {
    const a = (u - OW / 2) * (4.2 + 0.04 * v);
    const b = (v - OH / 2) * (1.6 + 0.03 * u);
    const th = 0.5 + 0.004 * u;
    return [SIZE / 2 + Math.cos(th) * a - Math.sin(th) * b, SIZE / 2 + Math.sin(th) * a + Math.cos(th) * b];
  };
  const map = mapOf(OW, OH, (i, j) => warp(i + 0.5, j + 0.5));
  // A smooth pattern (period ≈ 40 px) under a 1-pixel checkerboard of ±40 codes (all aliasing, no signal).
  const value = (p: number, q: number) =>
    127.5 + 55 * Math.sin(p / 6.3) * Math.cos(q / 7.1) + ((p + q) % 2 === 0 ? -40 : 40);
  const src = image(SIZE, SIZE, 1, (k) => Math.round(value(k % SIZE, Math.floor(k / SIZE))));

  /** Brute force: the mean of the source over the output pixel's exact footprint, 48 × 48 points. */
  function boxReference(): Float64Array {
    const S = 48;
    const ref = new Float64Array(OW * OH);
    for (let j = 0; j < OH; j++) {
      for (let i = 0; i < OW; i++) {
        let sum = 0;
        for (let b = 0; b < S; b++) {
          for (let a = 0; a < S; a++) {
            const [x, y] = warp(i + (a + 0.5) / S, j + (b + 0.5) / S);
            sum += src.data[Math.floor(y) * SIZE + Math.floor(x)];
          }
        }
        ref[j * OW + i] = sum / (S * S);
      }
    }
    return ref;
  }

  it('comes within a few code values of a brute-force box filter over the footprint', () => {
    const ref = boxReference();
    const error = (img: ImageBuffer) => {
      let sum = 0;
      let max = 0;
      for (let k = 0; k < ref.length; k++) {
        const e = Math.abs(img.data[k] - ref[k]);
        sum += e;
        max = Math.max(max, e);
      }
      return { mean: sum / ref.length, max };
    };
    const area = error(remap(src, map, { filter: 'area' }));
    const bilinear = error(remap(src, map, { filter: 'bilinear' }));
    // Measured: area mean 1.7, max 10 — trilinear levels blur a little more than a box (and the box
    // itself lets some of the checkerboard through at the footprint's edges); bilinear mean 11, max 41.
    expect(area.mean).toBeLessThan(2.5);
    expect(area.max).toBeLessThan(12);
    expect(bilinear.mean).toBeGreaterThan(8); // the checkerboard aliases without the footprint
    expect(bilinear.max).toBeGreaterThan(30);
  });

  it('gives the same codes with a prepared pyramid, in bands, and per channel', () => {
    for (const bits of [8, 16] as const) {
      const max = bits === 8 ? 255 : 65535;
      const rgb = image(SIZE, SIZE, 3, noise(max, 5), bits);
      const whole = remap(rgb, map, { filter: 'area' });
      const pyramid = buildPyramid(rgb);
      const out = createImageLike(rgb, OW, OH);
      for (const [rowStart, rowEnd] of [[0, 7], [7, 30], [30, OH]]) remap(rgb, map, { filter: 'area', pyramid, out, rowStart, rowEnd });
      expect([...out.data], `${bits}-bit bands`).toEqual([...whole.data]);
      // The unrolled RGB and RGBA kernel against the general one, channel by channel.
      for (const C of [3, 4] as const) {
        const img = C === 3 ? rgb : image(SIZE, SIZE, 4, noise(max, 6), bits);
        const all = C === 3 ? whole : remap(img, map, { filter: 'area' });
        for (let c = 0; c < C; c++) {
          const one = image(SIZE, SIZE, 1, (k) => img.data[k * C + c], bits);
          const got = remap(one, map, { filter: 'area' });
          expect([...got.data], `${bits}-bit ${C}-channel channel ${c}`).toEqual([...all.data].filter((_, k) => k % C === c));
        }
      }
    }
  });

  it('reduces by 2 × 2 boxes, rounding, with the odd edge averaged with itself, and builds the half level', () => {
    // 5×3 grey → 3×2 → 2×1 → 1×1.
    const src5 = image(5, 3, 1, [0, 10, 20, 30, 40, 1, 11, 21, 31, 41, 100, 110, 120, 130, 140]);
    const pyr = buildPyramid(src5);
    expect(pyr.levels.map((l) => `${l.width}×${l.height}`)).toEqual(['5×3', '3×2', '2×1', '1×1']);
    expect(pyr.levels[0]).toBe(src5);
    // (0+10+1+11)/4 = 5.5 → 6; (20+30+21+31)/4 = 25.5 → 26; (40+40+41+41)/4 = 40.5 → 41; the last
    // row is averaged with itself: (100+110)/2 = 105, (120+130)/2 = 125, 140.
    expect([...pyr.levels[1].data]).toEqual([6, 26, 41, 105, 125, 140]);
    expect([...pyr.levels[2].data]).toEqual([66, 91]); // (6+26+105+125)/4 = 65.5 → 66; (41+41+140+140)/4 = 90.5 → 91
    expect([...pyr.levels[3].data]).toEqual([79]); // 78.5 → 79
    // The half level: the same boxes at every pixel, the last column and row clamped.
    expect(pyr.half && `${pyr.half.width}×${pyr.half.height}`).toBe('5×3');
    expect([...pyr.half!.data]).toEqual([6, 16, 26, 36, 41, 56, 66, 76, 86, 91, 105, 115, 125, 135, 140]);
    // Memory is reused on a second build of the same size.
    const first = pyr.levels[1].data;
    const again = buildPyramid(src5, { into: pyr });
    expect(again).toBe(pyr);
    expect(again.levels[1].data).toBe(first);
    expect([...again.levels[1].data]).toEqual([6, 26, 41, 105, 125, 140]);
  });

  it('rejects a pyramid of another source or of the wrong shape', () => {
    const other = image(SIZE, SIZE, 1, () => 0);
    expect(() => remap(src, map, { filter: 'area', pyramid: buildPyramid(other) })).toThrow(
      'Expected options.pyramid built from src (levels[0] is src)',
    );
    const wrong = buildPyramid(src, { levels: 3 });
    wrong.levels[2] = wrong.levels[1];
    expect(() => remap(src, map, { filter: 'area', pyramid: wrong })).toThrow('Expected 80×80×1 8-bit for options.pyramid.levels[2]');
  });
});

describe('remap: rows and memory', () => {
  it('computes the same image in row bands as in one piece', () => {
    const src = image(40, 30, 3, noise(255, 11));
    const warp = mapOf(23, 17, (i, j) => [3 + i * 1.6 + j * 0.3, 2 + j * 1.5 - i * 0.2 + 0.01 * i * i]);
    for (const filter of FILTERS) {
      const whole = remap(src, warp, { filter });
      const out = createImageLike(src, 23, 17);
      for (const [rowStart, rowEnd] of [[0, 5], [5, 6], [6, 13], [13, 17]]) {
        const back = remap(src, warp, { filter, out, rowStart, rowEnd });
        expect(back).toBe(out);
      }
      expect([...out.data], filter).toEqual([...whole.data]);
    }
  });

  it('leaves rows outside the band untouched', () => {
    const src = image(2, 2, 1, [50, 50, 50, 50]);
    const out = image(2, 3, 1, [9, 9, 9, 9, 9, 9]);
    remap(src, mapOf(2, 3, () => [1, 1]), { filter: 'nearest', out, rowStart: 1, rowEnd: 2 });
    expect([...out.data]).toEqual([9, 9, 50, 50, 9, 9]);
  });

  it('rejects malformed input, naming the field', () => {
    const src = image(2, 2, 1, [0, 0, 0, 0]);
    const map = mapOf(2, 2, () => [1, 1]);
    expect(() => remap(src, map, { filter: 'cubic' as RemapFilter })).toThrow(
      'Expected one of nearest, bilinear, area for options.filter but received cubic',
    );
    expect(() => remap(src, map, { maxSamples: 0 })).toThrow('Expected integer ≥ 1 for options.maxSamples but received 0');
    expect(() => remap(src, map, { rowEnd: 3 })).toThrow('Expected integer in [0, 2] for options.rowEnd but received 3');
    expect(() => remap(src, map, { out: image(2, 2, 3, new Array(12).fill(0)) })).toThrow(
      'Expected 2×2×1 for options.out but received 2×2×3',
    );
    expect(() => remap(src, map, { out: image(2, 2, 1, [0, 0, 0, 0], 16) })).toThrow(
      'Expected 8-bit data for options.out but received 16-bit',
    );
    expect(() => remap(src, { ...map, gain: new Float32Array(3) })).toThrow(
      'Expected Float32Array of 4 for map.gain but received Float32Array of 3',
    );
    expect(() => remap({ ...src, channels: 5 as 1 }, map)).toThrow('Expected 1, 2, 3 or 4 for src.channels but received 5');
  });
});
