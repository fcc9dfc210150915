/** `pattern markers`: numbered in the order given on the command line; labels drawn to read correctly on the dome after the mirror. */
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { rmSync } from 'node:fs';
import { DEMO_RIG, skyfold, tempDir } from './support.js';

const dir = tempDir('skyfold-markers-');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('skyfold pattern markers', () => {
  it('numbers --at and --markers in the order given, interleaved as written', async () => {
    const r = await skyfold(['pattern', 'markers', '--rig', DEMO_RIG, '--at', 'zenith', '--markers', '960,300', '--at', 'rim@0', '--markers', '1000,900', '-o', join(dir, 'm.png'), '--json']);
    expect(r.code, r.stderr).toBe(0);
    const m = JSON.parse(r.stdout).markers;
    expect(m.map((x: { number: number; from: string }) => [x.number, x.from])).toEqual([[1, 'zenith'], [2, 'pixel'], [3, 'rim@0'], [4, 'pixel']]);
    expect(m[1].pixel).toEqual([960, 300]);
    expect(m[3].pixel).toEqual([1000, 900]);
  });

  it('draws the labels mirrored for the demo rig, whose one reflection reverses the picture', async () => {
    // one reflection reverses handedness (plane or convex mirror alike, handbook optics), so digits drawn
    // plainly in projector space read reversed on the dome; the demo rig's light meets the mirror once
    const r = await skyfold(['pattern', 'markers', '--rig', DEMO_RIG, '--at', 'zenith', '--at', '45,30', '-o', join(dir, 'z.png'), '--json']);
    expect(r.code, r.stderr).toBe(0);
    for (const x of JSON.parse(r.stdout).markers) expect(x.labelMirrored).toBe(true);
  });
});
