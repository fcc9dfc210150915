import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { buildPyramid } from '../src/remap/pyramid.js';
import { createImageLike, remap } from '../src/remap/remap.js';
import { type ImageBuffer, type RemapMap } from '../src/remap/types.js';
// @ts-ignore -- a plain .mjs script without typings
import { assemble, generated } from '../../../scripts/build-wasm.mjs';

const WASM_DIR = new URL('../src/remap/wasm/', import.meta.url);

/** Deterministic pseudo-random 8-bit image. */
function image(width: number, height: number, channels: 1 | 2 | 3 | 4, seed = 1): ImageBuffer {
  const data = new Uint8Array(width * height * channels);
  let s = seed;
  for (let k = 0; k < data.length; k++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    data[k] = s >>> 24;
  }
  return { width, height, channels, data };
}

describe('remap: WebAssembly kernels', () => {
  it('keep the generated modules in step with their .wat sources (wabt re-assembles them)', async () => {
    const wats = readdirSync(WASM_DIR).filter((f) => f.endsWith('.wat'));
    expect(wats).toContain('pyramid.wat');
    for (const file of wats) {
      const name = file.slice(0, -4);
      const bytes: Uint8Array = await assemble(file, readFileSync(new URL(file, WASM_DIR), 'utf8'));
      const kept = readFileSync(new URL(`${name}-wasm.ts`, WASM_DIR), 'utf8');
      expect(kept, `${name}-wasm.ts: run node scripts/build-wasm.mjs`).toBe(generated(name, bytes));
    }
  });

  it('reduce pyramid levels and the half level bit for bit like the JavaScript reduction (odd and even sizes, 1–4 channels)', () => {
    const sizes: [number, number][] = [[1, 1], [2, 1], [1, 3], [5, 3], [7, 5], [16, 16], [17, 9], [33, 31], [64, 3], [130, 67]];
    for (const channels of [1, 2, 3, 4] as const) {
      for (const [w, h] of sizes) {
        const src = image(w, h, channels, w * 31 + h + channels);
        const fast = buildPyramid(src);
        const slow = buildPyramid(src, { wasm: false });
        expect(fast.levels.length).toBe(slow.levels.length);
        for (let l = 1; l < slow.levels.length; l++) {
          expect(fast.levels[l].data, `${w}×${h}×${channels} level ${l}`).toEqual(slow.levels[l].data);
        }
        expect(fast.half!.data, `${w}×${h}×${channels} half level`).toEqual(slow.half!.data);
      }
    }
  });

  it('give the area filter the same levels as a pyramid reduced in JavaScript', () => {
    const N = 300;
    const src = image(N, N, 3, 9);
    const rgba = image(N, N, 4, 10);
    const w = 40;
    const h = 30;
    const map: RemapMap = { width: w, height: h, x: new Float32Array(w * h), y: new Float32Array(w * h), gain: new Float32Array(w * h).fill(1) };
    for (let j = 0; j < h; j++) {
      for (let i = 0; i < w; i++) {
        // Footprints 1.1–7 pixels: the source, the half level and levels 1 to 3.
        map.x[j * w + i] = 10 + i * (1.1 + j * 0.2);
        map.y[j * w + i] = 12 + j * (1.2 + i * 0.05);
      }
    }
    for (const img of [src, rgba]) {
      const inside = remap(img, map, { filter: 'area' });
      const given = remap(img, map, { filter: 'area', pyramid: buildPyramid(img, { wasm: false }), out: createImageLike(img, w, h) });
      expect([...inside.data], `${img.channels} channels`).toEqual([...given.data]);
    }
  });
});
