/**
 * The speed-related parts of `skyfold warp`, run in-process on temporary files: the map kept
 * between runs.
 */
import { mkdirSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { starField } from '@skyfold/warp-core';
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
