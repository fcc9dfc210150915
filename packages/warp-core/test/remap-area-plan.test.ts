// The 'area' filter with its footprints planned once per map (prepareArea) gives exactly the pixels
// of the filter working them out per frame: every kind of pixel (outside, magnified, one probe,
// several probes), 8 and 16 bits, RGB and RGBA, gains 0, 1 and between, whole and in row bands.
import { describe, expect, it } from 'vitest';
import { buildPyramid } from '../src/remap/pyramid.js';
import { createImageLike, prepareArea, remap } from '../src/remap/remap.js';
import type { ImageBuffer, RemapMap } from '../src/remap/types.js';

const SRC = 97;
const OW = 61;
const OH = 47;

/** A map that magnifies at the top left, minifies ever more steeply and anisotropically toward the bottom right, runs off the source and holds a NaN. */
function testMap(): RemapMap {
  const x = new Float32Array(OW * OH);
  const y = new Float32Array(OW * OH);
  const gain = new Float32Array(OW * OH);
  for (let j = 0, k = 0; j < OH; j++) {
    for (let i = 0; i < OW; i++, k++) {
      const u = i / OW;
      const v = j / OH;
      x[k] = -3 + i * (0.4 + 3.5 * u * u) + 2 * Math.sin(j * 0.3);
      y[k] = 1 + j * (0.3 + 1.2 * v * u) + i * 0.2;
      gain[k] = k % 7 === 0 ? 0 : k % 5 === 0 ? 0.6 : 1;
    }
  }
  x[OW * 20 + 30] = Number.NaN;
  return { width: OW, height: OH, x, y, gain };
}

function noiseImage(C: number, bits: 8 | 16, seed: number): ImageBuffer {
  const n = SRC * SRC * C;
  const data = bits === 8 ? new Uint8Array(n) : new Uint16Array(n);
  const max = bits === 8 ? 255 : 65535;
  let s = seed;
  for (let k = 0; k < n; k++) {
    s = (s * 1103515245 + 12345) >>> 0;
    data[k] = (s >>> 8) % (max + 1);
  }
  return { width: SRC, height: SRC, channels: C, data };
}

describe('remap: area with a prepared plan', () => {
  const map = testMap();

  it('plans every kind of pixel on the test map', () => {
    const plan = prepareArea(map, SRC, SRC, 8);
    const kinds = new Set(plan.kind);
    for (const k of [0, 1, 2, 3]) expect(kinds.has(k)).toBe(true);
    expect(plan.step.length).toBe(2 * plan.kind.filter((k) => k === 3).length);
    expect(plan.rowFirst[OH]).toBe(plan.step.length / 2);
  });

  it('gives the same codes as without it', () => {
    for (const maxSamples of [8, 3]) {
      const plan = prepareArea(map, SRC, SRC, maxSamples);
      for (const bits of [8, 16] as const) {
        for (const C of [3, 4]) {
          const src = noiseImage(C, bits, 7 + C + bits);
          for (const linearGain of [true, false]) {
            const want = remap(src, map, { filter: 'area', maxSamples, linearGain });
            const got = remap(src, map, { filter: 'area', maxSamples, linearGain, areaPlan: plan });
            expect([...got.data], `${bits}-bit ${C} channels maxSamples ${maxSamples}`).toEqual([...want.data]);
          }
          const pyramid = buildPyramid(src);
          const out = createImageLike(src, OW, OH);
          for (const [rowStart, rowEnd] of [[0, 5], [5, 30], [30, OH]]) remap(src, map, { filter: 'area', maxSamples, pyramid, out, rowStart, rowEnd, areaPlan: plan });
          expect([...out.data], `${bits}-bit ${C} channels in bands`).toEqual([...remap(src, map, { filter: 'area', maxSamples }).data]);
        }
      }
    }
  });

  it('refuses a plan made for another map, source size or probe count', () => {
    const src = noiseImage(3, 8, 1);
    const plan = prepareArea(map, SRC, SRC, 8);
    expect(() => remap(src, testMap(), { filter: 'area', areaPlan: plan })).toThrow('from another map');
    expect(() => remap(src, map, { filter: 'area', maxSamples: 4, areaPlan: plan })).toThrow('with maxSamples 4 but it was made for 97×97 with maxSamples 8');
    expect(() => remap(noiseImage(3, 8, 1), map, { filter: 'area', areaPlan: prepareArea(map, 90, SRC) })).toThrow('but it was made for 90×97');
    expect(() => prepareArea(map, SRC, SRC, 0)).toThrow('Expected integer in [1, 65535] for maxSamples but received 0');
  });
});
