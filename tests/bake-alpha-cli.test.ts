/**
 * `skyfold bake --alpha-resolution full` (issue 11): the MPCDI alpha map and the PNG map traced exactly
 * at every projector pixel. Run in-process on temporary files. Baked with brightness compensation off,
 * so the alpha map is the mask alone: lit where the pixel's centre is lit, and across the edge the
 * share of the pixel on the lit side, both judged here against the trace itself.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { unzipSync } from 'fflate';
import sharp from 'sharp';
import { parse } from 'yaml';
import { Tracer, rigFromDocument, type Rig } from '@skyfold/warp-core';
import { decodeMesh } from '@skyfold/warp-cli';
import { demoRigText, skyfold, tempDir } from './support.js';

const W = 480;
const H = 300;
const run = (...args: string[]) => skyfold(args);

async function grey(bytes: Uint8Array): Promise<{ width: number; height: number; data: Uint8Array }> {
  const { data, info } = await sharp(bytes).toColorspace('b-w').raw().toBuffer({ resolveWithObject: true });
  expect(info.channels).toBe(1);
  return { width: info.width, height: info.height, data: new Uint8Array(data) };
}

describe('bake --alpha-resolution full', () => {
  const dir = tempDir('alpha');
  let rig: Rig;
  let tracer: Tracer;
  let full: { width: number; height: number; data: Uint8Array };
  let grid: { width: number; height: number; data: Uint8Array };
  let lit: (x: number, y: number) => boolean;

  beforeAll(async () => {
    // the demo rig at a small resolution, to keep the test quick
    const text = demoRigText([W, H]);
    writeFileSync(join(dir, 'rig.yaml'), text);
    rig = rigFromDocument(parse(text));
    tracer = new Tracer(rig);
    lit = (x, y) => {
      const t = tracer.pixel(x, y);
      return (t.kind === 'dome' || t.kind === 'below-horizon') && (t.fisheye[0] - 0.5) ** 2 + (t.fisheye[1] - 0.5) ** 2 <= 0.25;
    };
    const a = await run('bake', join(dir, 'rig.yaml'), '-o', join(dir, 'full.mpcdi'), '-o', join(dir, 'full.png'), '--alpha-resolution', 'full', '--brightness', '0', '--json');
    expect(a.stderr).toBe('');
    expect(a.code).toBe(0);
    expect(JSON.parse(a.stdout).alphaResolution).toBe('full');
    const b = await run('bake', join(dir, 'rig.yaml'), '-o', join(dir, 'grid.mpcdi'), '--brightness', '0', '--json');
    expect(b.code).toBe(0);
    const alphaOf = async (file: string) => {
      const zip = unzipSync(new Uint8Array(readFileSync(join(dir, file))));
      const name = Object.keys(zip).find((k) => k.endsWith('.png'))!;
      return grey(zip[name]);
    };
    full = await alphaOf('full.mpcdi');
    grid = await alphaOf('grid.mpcdi');
  }, 120_000);

  it("lights exactly the pixels whose centre is lit (mask ≥ 0.5 there), which the grid's alpha map does not", () => {
    expect([full.width, full.height]).toEqual([W, H]);
    let wrongFull = 0;
    let wrongGrid = 0;
    let litCount = 0;
    for (let j = 0; j < H; j++)
      for (let i = 0; i < W; i++) {
        const l = lit(i + 0.5, j + 0.5);
        if (l) litCount++;
        // 0.5 is written as round(127.5) = 128
        if (l !== full.data[j * W + i] >= 128) wrongFull++;
        if (l !== grid.data[j * W + i] >= 128) wrongGrid++;
      }
    expect(litCount).toBeGreaterThan(0.3 * W * H);
    expect(wrongFull).toBe(0);
    expect(wrongGrid).toBeGreaterThan(0); // the grid's ramp is a cell diagonal wide: it cannot be exact per pixel
  });

  it('across the edge, the share of each pixel on the lit side (supersampled 16 × 16 from the trace)', () => {
    const errs: number[] = [];
    for (let j = 1; j < H - 1; j++)
      for (let i = 1; i < W - 1; i++) {
        const a = full.data[j * W + i];
        // edge pixels: the centre's state differs from a neighbour's
        const c = lit(i + 0.5, j + 0.5);
        if (c === lit(i + 1.5, j + 0.5) && c === lit(i - 0.5, j + 0.5) && c === lit(i + 0.5, j + 1.5) && c === lit(i + 0.5, j - 0.5)) continue;
        let inside = 0;
        for (let b = 0; b < 16; b++) for (let q = 0; q < 16; q++) if (lit(i + (q + 0.5) / 16, j + (b + 0.5) / 16)) inside++;
        errs.push(Math.abs(a / 255 - inside / 256));
      }
    errs.sort((x, y) => x - y);
    const mean = errs.reduce((s, e) => s + e, 0) / errs.length;
    console.info(`alpha map, full resolution: ${errs.length} edge pixels, |alpha − coverage| mean ${mean.toFixed(3)}, max ${errs[errs.length - 1].toFixed(3)}`);
    expect(errs.length).toBeGreaterThan(300);
    // 0.5 + d is the coverage of a pixel by an edge along its rows or columns; a diagonal edge differs
    // from it by at most 1/8 (the corner triangles of a unit square), a corner of the lit area by more
    expect(mean).toBeLessThan(0.05);
    expect(errs[errs.length - 1]).toBeLessThan(0.25);
  });

  it('the PNG map: one pixel per projector pixel, marked as such, u and v traced at each centre', async () => {
    const bytes = new Uint8Array(readFileSync(join(dir, 'full.png')));
    const meta = await sharp(bytes).metadata();
    expect([meta.width, meta.height, meta.depth, meta.channels]).toEqual([W, H, 'ushort', 4]);
    // libvips reads PNG tEXt chunks as comments
    expect(meta.comments).toEqual([{ keyword: 'skyfold-layout', text: 'pixel-centres' }]);
    const { data } = await sharp(bytes).toColorspace('rgb16').raw({ depth: 'ushort' }).toBuffer({ resolveWithObject: true });
    const px = new Uint16Array(data.buffer, data.byteOffset, data.byteLength / 2);
    let checked = 0;
    for (let j = 3; j < H; j += 7)
      for (let i = 5; i < W; i += 11) {
        const t = tracer.pixel(i + 0.5, j + 0.5);
        const k = (j * W + i) * 4;
        expect(Math.abs(px[k + 3] / 65535 - full.data[j * W + i] / 255)).toBeLessThan(0.6 / 255); // the same mask as the alpha map
        if (t.kind !== 'dome') continue;
        expect(Math.abs(px[k] / 65535 - t.fisheye[0])).toBeLessThan(1 / 65535);
        expect(Math.abs(px[k + 1] / 65535 - t.fisheye[1])).toBeLessThan(1 / 65535);
        checked++;
      }
    expect(checked).toBeGreaterThan(500);
    await expect(decodeMesh(bytes, 'png')).rejects.toThrow(/full-resolution/);
  });

  it('refuses an unknown --alpha-resolution with exit 2 and one line', async () => {
    const r = await run('bake', join(dir, 'rig.yaml'), '-o', join(dir, 'x.mpcdi'), '--alpha-resolution', 'half');
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/--alpha-resolution/);
  });
});
