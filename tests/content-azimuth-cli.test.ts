// content.azimuth and `warp --rotate` at any angle (issue 12) through the CLI, on the school's
// mesh-dome rig: a marked dome-master pixel lands on the projector pixel that lights the dome there.
import { copyFileSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { DEG, locateDirection, parseTriangleFile, rigFromDocument, Tracer } from '@skyfold/warp-core';
import { parse } from 'yaml';
import { FIXTURES, skyfold, tempDir } from './support.js';

const dir = tempDir('content-azimuth');
const N = 256;

/** The school rig at 192 × 108 with the given content.azimuth, beside a copy of its mesh. */
function schoolRig(name: string, azimuth: number | undefined): string {
  let text = readFileSync(join(FIXTURES, 'school-dome-rig.yaml'), 'utf8').replace(/resolution: \[1920, 1080\]/, 'resolution: [192, 108]');
  if (azimuth !== undefined) text = text.replace(/^content:\n/m, `content:\n  azimuth: ${azimuth}\n`);
  const path = join(dir, name);
  writeFileSync(path, text);
  copyFileSync(join(FIXTURES, 'school-dome.obj'), join(dir, 'school-dome.obj'));
  return path;
}

/** A black N × N master with a white 9 × 9 spot at content (azimuth, altitude) in degrees. */
async function markedMaster(name: string, azDeg: number, altDeg: number): Promise<string> {
  const rho = (0.5 * (90 - altDeg)) / 90;
  const cx = Math.round((0.5 + rho * Math.sin(azDeg * DEG)) * N);
  const cy = Math.round((0.5 + rho * Math.cos(azDeg * DEG)) * N);
  const data = Buffer.alloc(N * N * 3);
  for (let y = cy - 4; y <= cy + 4; y++) for (let x = cx - 4; x <= cx + 4; x++) data.fill(255, 3 * (y * N + x), 3 * (y * N + x) + 3);
  const path = join(dir, name);
  await sharp(data, { raw: { width: N, height: N, channels: 3 } }).png().toFile(path);
  return path;
}

/** The brightest pixel of a warped frame, and the pixel that lights the dome direction (azimuth, altitude) there. */
async function check(rigPath: string, out: string, azDeg: number, altDeg: number): Promise<void> {
  const { data, info } = await sharp(out).raw().toBuffer({ resolveWithObject: true });
  let best = -1;
  let at = 0;
  for (let k = 0; k < info.width * info.height; k++) {
    const s = data[k * info.channels];
    if (s > best) [best, at] = [s, k];
  }
  expect(best).toBeGreaterThan(100);
  const rig = rigFromDocument(parse(readFileSync(rigPath, 'utf8')), { loadMesh: (f) => parseTriangleFile(readFileSync(join(dir, f)), f) });
  // the inverse on the as-built dome: the eye ray meets the mesh, the pixel whose light goes there
  const hit = locateDirection(new Tracer(rig), azDeg * DEG, altDeg * DEG);
  expect(hit.pixel).not.toBeNull();
  const [x, y] = [at % info.width, Math.floor(at / info.width)];
  expect(Math.hypot(x + 0.5 - hit.pixel![0], y + 0.5 - hit.pixel![1])).toBeLessThan(4);
}

describe('content.azimuth and --rotate on the school dome', () => {
  it('content.azimuth 150: the content front, 40° up, is shown at dome azimuth 150', async () => {
    const rig = schoolRig('az150.yaml', 150);
    const master = await markedMaster('front.png', 0, 40);
    const r = await skyfold(['warp', rig, master, '-o', join(dir, 'out150'), '--filter', 'bilinear', '--brightness', '0']);
    expect(r.code).toBe(0);
    await check(rig, join(dir, 'out150', 'front.png'), 150, 40);
  });

  it('--rotate 33.5: a frame delivered turned 33.5° counter-clockwise shows its front at the dome front', async () => {
    const rig = schoolRig('plain.yaml', undefined);
    const master = await markedMaster('turned.png', 33.5, 40);
    const r = await skyfold(['warp', rig, master, '-o', join(dir, 'rot'), '--rotate', '33.5', '--filter', 'bilinear', '--brightness', '0']);
    expect(r.code).toBe(0);
    await check(rig, join(dir, 'rot', 'turned.png'), 0, 40);
  });
});
