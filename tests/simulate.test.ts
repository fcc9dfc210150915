/**
 * The round trip through the program (run in-process): `skyfold simulate` of `skyfold warp` of a dome master F
 * must give F back over the lit part of the dome, up to the resolution the projector has there.
 * A 480 × 300 copy of the demo rig and 512² dome masters keep it quick.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { gridCard, smoothCard, srgbToLinear, type ImageBuffer } from '@skyfold/warp-core';
import { demoRigText, skyfold, tempDir } from './support.js';

const PROJ: [number, number] = [480, 300];
const N = 512;
/** Pixels of the lit region's edge left out of the comparisons (bilinear footprints straddle it). */
const ERODE = 3;

async function ok(args: string[]): Promise<void> {
  const r = await skyfold(args, { cwd: work });
  if (r.code !== 0) throw new Error(`skyfold ${args.join(' ')} → exit ${r.code}: ${r.stderr}`);
}

async function writePng(path: string, img: ImageBuffer): Promise<void> {
  await sharp(img.data, { raw: { width: img.width, height: img.height, channels: img.channels } }).png().toFile(path);
}

async function readRgb(path: string): Promise<Uint8Array> {
  const { data, info } = await sharp(path).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  expect(info.channels).toBe(3);
  return new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
}

/** 4-neighbour erosion of a size × size mask, `steps` times. */
function erode(mask: Uint8Array, size: number, steps: number): Uint8Array {
  let cur = mask;
  for (let s = 0; s < steps; s++) {
    const next = new Uint8Array(cur.length);
    for (let j = 1; j < size - 1; j++) {
      for (let i = 1; i < size - 1; i++) {
        const k = j * size + i;
        next[k] = cur[k] & cur[k - 1] & cur[k + 1] & cur[k - size] & cur[k + size];
      }
    }
    cur = next;
  }
  return cur;
}

/** The lit pixels of a simulated image: any channel above zero. */
function litMask(seen: Uint8Array): Uint8Array {
  const m = new Uint8Array(seen.length / 3);
  for (let k = 0; k < m.length; k++) m[k] = seen[3 * k] | seen[3 * k + 1] | seen[3 * k + 2] ? 1 : 0;
  return m;
}

function count(mask: Uint8Array): number {
  let n = 0;
  for (const v of mask) n += v;
  return n;
}

/** PSNR in dB of 8-bit RGB over the masked pixels (peak 255). */
function psnr(a: Uint8Array, b: Uint8Array, mask: Uint8Array): number {
  let se = 0;
  let n = 0;
  for (let k = 0; k < mask.length; k++) {
    if (!mask[k]) continue;
    for (let c = 0; c < 3; c++) {
      const d = a[3 * k + c] - b[3 * k + c];
      se += d * d;
    }
    n += 3;
  }
  return 10 * Math.log10((255 * 255) / (se / n));
}

const work = tempDir('simulate');
let rig: string;
/** What simulate marks as lit at N²: a full-white projector frame seen with geometry only. */
let lit: Uint8Array;

beforeAll(async () => {
  rig = join(work, 'rig.yaml');
  writeFileSync(rig, demoRigText(PROJ));
  mkdirSync(join(work, 'cards'));
  await writePng(join(work, 'cards', 'smooth.png'), smoothCard(N));
  await writePng(join(work, 'cards', 'grid.png'), gridCard(N));
  await sharp({ create: { width: PROJ[0], height: PROJ[1], channels: 3, background: { r: 255, g: 255, b: 255 } } }).png().toFile(join(work, 'white.png'));
  await Promise.all([
    ok(['warp', rig, join(work, 'cards'), '-o', join(work, 'warped'), '--brightness', '0', '--jobs', '1']),
    ok(['simulate', rig, join(work, 'white.png'), '-o', join(work, 'seen-white.png'), '--size', String(N), '--brightness', 'none']),
  ]);
  lit = litMask(await readRgb(join(work, 'seen-white.png')));
});

describe('simulate(warp(F)) ≈ F over the lit dome', () => {
  let smoothDb = NaN;

  it('a smooth card comes back at 35 dB or better (compensation off, geometry only)', async () => {
    await ok(['simulate', rig, join(work, 'warped', 'smooth.png'), '-o', join(work, 'seen-smooth.png'), '--size', String(N), '--brightness', 'none']);
    const mask = erode(lit, N, ERODE);
    // the demo rig lights nearly the whole dome master circle (π/4 of the square) but the mirror's own shadow
    expect(count(mask)).toBeGreaterThan(0.9 * (Math.PI / 4) * N * N);
    smoothDb = psnr(await readRgb(join(work, 'cards', 'smooth.png')), await readRgb(join(work, 'seen-smooth.png')), mask);
    console.info(`round trip PSNR, smoothCard(${N}), ${PROJ[0]}x${PROJ[1]} projector: ${smoothDb.toFixed(2)} dB over ${count(mask)} px`);
    expect(smoothDb).toBeGreaterThanOrEqual(35);
  });

  it('a fine grid shows the resolution loss: a clearly lower PSNR', async () => {
    await ok(['simulate', rig, join(work, 'warped', 'grid.png'), '-o', join(work, 'seen-grid.png'), '--size', String(N), '--brightness', 'none']);
    const mask = erode(lit, N, ERODE);
    const gridDb = psnr(await readRgb(join(work, 'cards', 'grid.png')), await readRgb(join(work, 'seen-grid.png')), mask);
    console.info(`round trip PSNR, gridCard(${N}) (1-px lines): ${gridDb.toFixed(2)} dB`);
    expect(gridDb).toBeLessThan(28);
    if (Number.isFinite(smoothDb)) expect(gridDb).toBeLessThan(smoothDb - 10);
  });
});

describe('brightness: compensation flattens what the audience sees', () => {
  it('a flat grey frame, warped with compensation and seen with physical brightness, is flatter than without', async () => {
    const S = 256;
    const grey = 60; // dark enough that the uncompensated hot spots stay below white
    mkdirSync(join(work, 'grey'));
    await sharp({ create: { width: S, height: S, channels: 3, background: { r: grey, g: grey, b: grey } } }).png().toFile(join(work, 'grey', 'grey.png'));
    await Promise.all([
      ok(['warp', rig, join(work, 'grey'), '-o', join(work, 'grey-on'), '--brightness', '1', '--jobs', '1']),
      ok(['warp', rig, join(work, 'grey'), '-o', join(work, 'grey-off'), '--brightness', '0', '--jobs', '1']),
    ]);
    await Promise.all(
      ['on', 'off'].map((m) => ok(['simulate', rig, join(work, `grey-${m}`, 'grey.png'), '-o', join(work, `seen-grey-${m}.png`), '--size', String(S), '--brightness', 'physical'])),
    );
    const on = await readRgb(join(work, 'seen-grey-on.png'));
    const off = await readRgb(join(work, 'seen-grey-off.png'));
    const litOn = litMask(on);
    const litOff = litMask(off);
    const mask = erode(
      litOn.map((v, k) => v & litOff[k]),
      S,
      ERODE,
    );
    expect(count(mask)).toBeGreaterThan(0.8 * (Math.PI / 4) * S * S);
    const spread = (img: Uint8Array) => {
      const v: number[] = [];
      for (let k = 0; k < mask.length; k++) if (mask[k]) v.push(srgbToLinear(img[3 * k] / 255));
      v.sort((a, b) => a - b);
      const q = (p: number) => v[Math.floor(p * (v.length - 1))];
      return { p5: q(0.05), p50: q(0.5), p95: q(0.95), max: q(1), ratio: q(0.95) / q(0.05) };
    };
    const sOn = spread(on);
    const sOff = spread(off);
    console.info(`seen luminance p95/p5 (linear): compensation on ${sOn.ratio.toFixed(3)}, off ${sOff.ratio.toFixed(3)}`);
    // the uncompensated run must stay unclipped, or its spread would be understated
    expect(sOff.max).toBeLessThan(1);
    expect(sOff.ratio).toBeGreaterThan(2);
    expect(sOn.ratio).toBeLessThan(1.25);
    expect(sOn.ratio).toBeLessThan(sOff.ratio / 2);
    // fully compensated, the dome shows the content's own level (simulate normalizes by the reference area)
    expect(sOn.p50).toBeCloseTo(srgbToLinear(grey / 255), 2);
  });
});
