/**
 * The speed-related parts of `skyfold warp`, run in-process on temporary files: the PNG level
 * (--compression), the fixed-point bilinear kernel the CLI uses, and the map kept between runs.
 */
import { mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { pixelMapFromRig, prepareBilinear, remap, rigFromDocument, starField, type ImageBuffer } from '@skyfold/warp-core';
import { demoRigText, skyfold, tempDir } from './support.js';

const dir = tempDir('warp-speed');
const RIG = join(dir, 'rig.yaml');
const SHOW = join(dir, 'show');
const SIZE = 384;

beforeAll(async () => {
  writeFileSync(RIG, demoRigText([160, 100]));
  mkdirSync(SHOW);
  const img = starField(SIZE, { seed: 4, count: 400 });
  await sharp(img.data, { raw: { width: SIZE, height: SIZE, channels: 3 } }).png().toFile(join(SHOW, 'f_1.png'));
});

const run = async (...args: string[]) => (await skyfold(args)).code;

async function pixels(path: string): Promise<ImageBuffer> {
  const { data, info } = await sharp(path).raw().toBuffer({ resolveWithObject: true });
  return { width: info.width, height: info.height, channels: info.channels as 3, data: new Uint8Array(data) };
}

describe('skyfold warp --compression', () => {
  it('trades size for speed losslessly: level 1 is larger than level 9, the pixels the same', async () => {
    expect(await run('warp', RIG, SHOW, '-o', join(dir, 'c1'), '--compression', '1', '--jobs', '1', '--filter', 'bilinear')).toBe(0);
    expect(await run('warp', RIG, SHOW, '-o', join(dir, 'c9'), '--compression', '9', '--jobs', '1', '--filter', 'bilinear')).toBe(0);
    const a = join(dir, 'c1', 'f_1.png');
    const b = join(dir, 'c9', 'f_1.png');
    expect(statSync(a).size).toBeGreaterThan(statSync(b).size);
    expect(Buffer.from((await pixels(a)).data).equals(Buffer.from((await pixels(b)).data))).toBe(true);
  });

  it('refuses a level outside 0-9', async () => {
    const r = await skyfold(['warp', RIG, SHOW, '-o', join(dir, 'bad'), '--compression', '10']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('--compression');
  });
});

describe('skyfold warp --filter bilinear', () => {
  it('writes what the fixed-point kernel gives for the rig map', async () => {
    expect(await run('warp', RIG, SHOW, '-o', join(dir, 'bl'), '--jobs', '1', '--filter', 'bilinear')).toBe(0);
    const rig = rigFromDocument(parse(readFileSync(RIG, 'utf8')));
    const map = pixelMapFromRig(rig, [SIZE, SIZE]);
    const src = await pixels(join(SHOW, 'f_1.png'));
    const want = remap(src, map, { filter: 'bilinear', prepared: prepareBilinear(map, SIZE, SIZE, 3) });
    const got = await pixels(join(dir, 'bl', 'f_1.png'));
    expect(Buffer.from(got.data).equals(Buffer.from(want.data))).toBe(true);
    // and the float kernel gives something slightly different here, so the check tells them apart
    expect(Buffer.from(remap(src, map, { filter: 'bilinear' }).data).equals(Buffer.from(want.data))).toBe(false);
  });
});

describe('the map kept between runs', () => {
  it('is written to $SKYFOLD_MAP_CACHE once and gives the same frames when read back', async () => {
    const cache = join(dir, 'cache');
    const env = { SKYFOLD_MAP_CACHE: cache };
    expect((await skyfold(['warp', RIG, SHOW, '-o', join(dir, 'm1'), '--jobs', '1'], { env })).code).toBe(0);
    const maps = () => readdirSync(cache).filter((f) => f.endsWith('.map'));
    expect(maps().length).toBe(1);
    const stamp = statSync(join(cache, maps()[0])).mtimeMs;
    expect((await skyfold(['warp', RIG, SHOW, '-o', join(dir, 'm2'), '--jobs', '1'], { env })).code).toBe(0);
    // read, not rewritten
    expect(statSync(join(cache, maps()[0])).mtimeMs).toBe(stamp);
    expect(readFileSync(join(dir, 'm2', 'f_1.png')).equals(readFileSync(join(dir, 'm1', 'f_1.png')))).toBe(true);
  });
});
