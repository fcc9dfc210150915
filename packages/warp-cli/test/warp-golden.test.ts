/**
 * A fixed warped frame against a golden image, within a threshold (the habit of d3-geo's
 * test/snapshot-test.js and sharp's test/fixtures/index.js): the baseline lives in fixtures/golden/,
 * is written only when missing and never in CI; on a mismatch a diff image goes to a temporary
 * folder and its path is printed. Delete the baseline and rerun locally to accept a deliberate change.
 */
import { copyFileSync, existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable, Writable } from 'node:stream';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { gridCard } from '@skyfold/warp-core';
import { run } from '../src/main.js';

const ROOT = fileURLToPath(new URL('../../..', import.meta.url));
const GOLDEN = join(ROOT, 'fixtures', 'golden');
/** The demo rig with a 320 × 200 projector. */
const RIG = join(GOLDEN, 'warp-rig-320x200.yaml');
/** gridCard(256) (10° rings, 15° spokes, the front spoke red) with an orange block on the viewer's right, so a mirrored or turned warp cannot pass. */
const INPUT = join(GOLDEN, 'grid-256.png');
const BASELINE = join(GOLDEN, 'warp-grid-256-320x200.png');
/** Every setting that shapes the output, pinned so a change of default shows up here as a choice. */
const SETTINGS = ['--filter', 'area', '--brightness', '1', '--brightness-floor', '0.1', '--feather', '0', '--format', 'png'];

/** Allowed: a sample may move by LOOSE code values (float rounding across machines); more than that on at most SHARE of the pixels. */
const LOOSE = 2;
const SHARE = 0.002;

const mayWriteBaseline = process.env.CI !== 'true';

/** The grid card plus a solid block at azimuth 60°–120° (right), zenith angle 30°–60° (DESIGN.md fisheye convention: right is +u). */
function asymmetricGrid(size: number) {
  const g = gridCard(size);
  const c = size / 2;
  for (let j = 0; j < size; j++) {
    for (let i = 0; i < size; i++) {
      const x = i + 0.5 - c;
      const y = j + 0.5 - c;
      const zen = (Math.hypot(x, y) / c) * 90;
      const az = ((Math.atan2(x, y) * 180) / Math.PI + 360) % 360;
      if (zen >= 30 && zen <= 60 && az >= 60 && az <= 120) g.data.set([250, 150, 20], (j * size + i) * 3);
    }
  }
  return g;
}

async function rgba(path: string): Promise<{ data: Buffer; width: number; height: number }> {
  const { data, info } = await sharp(path).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return { data, width: info.width, height: info.height };
}

describe('skyfold warp golden image', () => {
  it('warps the 256² grid card for the 320 × 200 demo rig as the baseline shows', async () => {
    if (!existsSync(INPUT)) {
      if (!mayWriteBaseline) throw new Error(`${INPUT}: missing input fixture (not created in CI)`);
      const g = asymmetricGrid(256);
      await sharp(g.data, { raw: { width: g.width, height: g.height, channels: g.channels } }).png().toFile(INPUT);
    }
    const out = mkdtempSync(join(tmpdir(), 'skyfold-golden-'));
    let stderr = '';
    const sink = (keep: boolean) => new Writable({ write: (c: Buffer, _e, done) => (keep && (stderr += String(c)), done()) });
    const code = await run(['warp', RIG, INPUT, '-o', out, '--jobs', '1', ...SETTINGS], { stdin: Readable.from([]), stdout: sink(false), stderr: sink(true), env: { ...process.env, CI: 'true' } });
    expect(code, stderr).toBe(0);
    const actualPath = join(out, 'grid-256.png');

    if (!existsSync(BASELINE)) {
      if (!mayWriteBaseline) throw new Error(`${BASELINE}: missing golden image (baselines are never created in CI)`);
      copyFileSync(actualPath, BASELINE);
      console.warn(`wrote the golden baseline ${BASELINE}; check it by eye and commit it`);
      rmSync(out, { recursive: true, force: true });
      return;
    }

    const a = await rgba(actualPath);
    const b = await rgba(BASELINE);
    expect([a.width, a.height]).toEqual([b.width, b.height]);
    const diff = Buffer.alloc(a.data.length);
    let worst = 0;
    let off = 0;
    for (let p = 0; p < a.width * a.height; p++) {
      let d = 0;
      for (let c = 0; c < 4; c++) d = Math.max(d, Math.abs(a.data[4 * p + c] - b.data[4 * p + c]));
      worst = Math.max(worst, d);
      const bad = d > LOOSE;
      if (bad) off++;
      // red where it differs, the baseline dimmed elsewhere
      diff[4 * p] = bad ? 255 : b.data[4 * p] >> 2;
      diff[4 * p + 1] = bad ? 0 : b.data[4 * p + 1] >> 2;
      diff[4 * p + 2] = bad ? 0 : b.data[4 * p + 2] >> 2;
      diff[4 * p + 3] = 255;
    }
    const share = off / (a.width * a.height);
    if (share > SHARE) {
      const diffPath = join(out, 'diff.png');
      await sharp(diff, { raw: { width: a.width, height: a.height, channels: 4 } }).png().toFile(diffPath);
      console.error(`golden mismatch: ${(share * 100).toFixed(3)}% of pixels differ by more than ${LOOSE} (worst ${worst}); actual ${actualPath}, diff ${diffPath}`);
      expect.fail(`${BASELINE}: ${(share * 100).toFixed(3)}% of pixels off by more than ${LOOSE} (allowed ${SHARE * 100}%); diff image: ${diffPath}`);
    }
    rmSync(out, { recursive: true, force: true });
  });
});
