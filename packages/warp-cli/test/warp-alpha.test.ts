/** A fully opaque RGBA frame warps to opaque black where the mesh masks; an input that uses its alpha keeps a transparent mask. */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { afterAll, describe, expect, it } from 'vitest';
import { runFrameJob } from '../src/warp/job.js';
import { loadMapSource } from '../src/warp/map-source.js';
import { alphaUnused, fillAlpha } from '../src/warp/opaque.js';

const RIG = fileURLToPath(new URL('../../../fixtures/golden/warp-rig-320x200.yaml', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'skyfold-alpha-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A 64 × 64 mid-grey RGBA frame with the given alpha everywhere. */
async function frame(name: string, alpha: number): Promise<string> {
  const path = join(dir, name);
  await sharp({ create: { width: 64, height: 64, channels: 4, background: { r: 128, g: 128, b: 128, alpha: alpha / 255 } } }).png().toFile(path);
  return path;
}

/** Warps one frame through the golden rig and returns the output's RGBA pixels and the map's gains. */
async function warpOne(input: string): Promise<{ rgba: Buffer; gain: Float32Array | Float64Array }> {
  const map = (await loadMapSource(RIG)).build([64, 64], {});
  const output = input.replace(/\.png$/, '-out.png');
  const o = await runFrameJob({ id: 0, input, output, temp: output + '.partial', format: 'png' }, map, { filter: 'bilinear', maxPixels: 1e6, sourceSize: [64, 64], encode: {} }, {});
  expect(o.ok).toBe(true);
  const { data, info } = await sharp(output).raw().toBuffer({ resolveWithObject: true });
  expect(info.channels).toBe(4);
  return { rgba: data, gain: map.gain };
}

describe('the alpha of warped frames', () => {
  it('an opaque RGBA input: masked pixels are opaque black [0, 0, 0, 255]', async () => {
    const { rgba, gain } = await warpOne(await frame('opaque.png', 255));
    const masked = [...gain.keys()].filter((k) => !(gain[k] > 0));
    expect(masked.length).toBeGreaterThan(100); // the golden rig misses the mirror and the dome in places
    for (const k of masked) expect([...rgba.subarray(4 * k, 4 * k + 4)]).toEqual([0, 0, 0, 255]);
  });

  it('an input that uses its alpha: masked pixels stay transparent, the rest keep the input alpha', async () => {
    const { rgba, gain } = await warpOne(await frame('half.png', 128));
    const k0 = [...gain.keys()].find((k) => !(gain[k] > 0))!;
    expect(rgba[4 * k0 + 3]).toBe(0);
    const k1 = [...gain.keys()].find((k) => gain[k] === 1)!;
    expect(rgba[4 * k1 + 3]).toBe(128);
  });

  it('alphaUnused and fillAlpha: 8 and 16 bits, grey + alpha, no alpha', () => {
    expect(alphaUnused({ width: 2, height: 1, channels: 4, data: Uint8Array.of(1, 2, 3, 255, 0, 0, 0, 255) })).toBe(true);
    expect(alphaUnused({ width: 2, height: 1, channels: 4, data: Uint8Array.of(1, 2, 3, 255, 0, 0, 0, 254) })).toBe(false);
    expect(alphaUnused({ width: 1, height: 1, channels: 2, data: Uint16Array.of(7, 0xffff) })).toBe(true);
    expect(alphaUnused({ width: 1, height: 1, channels: 3, data: Uint8Array.of(1, 2, 3) })).toBe(false);
    const img = { width: 2, height: 1, channels: 2 as const, data: Uint16Array.of(0, 0, 9, 5) };
    fillAlpha(img);
    expect([...img.data]).toEqual([0, 0xffff, 9, 0xffff]);
  });
});
