/** The sweep chart's mirror-height row: drawn, labelled in the rig's units, only where the mirror's height is free. */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { rigFromDocument, sweepPlacement, type Rig } from '@skyfold/warp-core';
import { parse } from 'yaml';
import { drawPlacementSweep } from '../packages/warp-cli/src/pictures/placement-sweep.js';
import { FIXTURES, skyfold, tempDir } from './support.js';

const dir = tempDir('plan-sweep-mirror');
const small = { distances: 4, heights: 2, mirrorHeights: 3, vertices: 150 };

function demoFt(): Rig {
  const rig = rigFromDocument(parse(readFileSync(join(FIXTURES, 'demo-rig-ft.yaml'), 'utf8')));
  rig.projector.resolution = [96, 60];
  return rig;
}

describe('placement sweep: the mirror height', () => {
  it('adds a row of panels over the mirror centre height, in feet, with its own ring', () => {
    const rig = demoFt();
    const C = rig.mirror.center;
    rig.room = { ...rig.room, mirror: { kind: 'within', min: [C[0] - 0.2, C[1] - 0.2, C[2] - 0.3], max: [C[0] + 0.2, C[1] + 0.2, C[2] + 0.3] } };
    const s = sweepPlacement(rig, small);
    expect(s.mirror).not.toBeNull();
    const texts = drawPlacementSweep(s, rig.units).labels.map((l) => l.text);
    for (const t of ['coverage, by mirror height', 'arcmin per pixel (median), by mirror height', 'pixels lit, by mirror height']) expect(texts).toContain(t);
    expect(texts).toContain("Across: distance from the mirror along the floor. Up: the mirror centre's height above the floor.");
    expect(texts.some((t) => t.startsWith('ring: the current rig (mirror centre ') && / ft /.test(t))).toBe(true);
    expect(texts.some((t) => / m$/.test(t))).toBe(false);
  });

  it('draws nothing extra where the mirror is fixed', () => {
    const rig = demoFt();
    rig.room = { ...rig.room, mirror: { kind: 'fixed' } };
    const s = sweepPlacement(rig, { ...small, vary: ['mirror.center.z'] });
    expect(s.mirror).toBeNull();
    const texts = drawPlacementSweep(s, rig.units).labels.map((l) => l.text);
    expect(texts.filter((t) => /mirror height|mirror centre/.test(t))).toEqual([]);
    expect(texts.filter((t) => t === 'coverage')).toHaveLength(1);
  });

  it('plan --vary mirror.center.z --sweep draws the second row: a taller PNG than with the mirror left alone', async () => {
    writeFileSync(join(dir, 'rig.yaml'), readFileSync(join(FIXTURES, 'poor-placement.yaml'), 'utf8').replace('resolution: [1920, 1200]', 'resolution: [96, 60]'));
    const plan = (vary: string[], out: string) => skyfold(['plan', 'rig.yaml', ...vary.flatMap((v) => ['--vary', v]), '--evaluations', '20', '--rays', '1000', '--sweep', out, '--json'], { cwd: dir });
    const [one, two] = [await plan(['projector.position'], 'one.png'), await plan(['projector.position', 'mirror.center.z'], 'two.png')];
    // so few evaluations may find no better rig (a non-zero exit); the sweep is written all the same
    expect(JSON.parse(one.stdout).sweep, one.stderr).toBe('one.png');
    expect(JSON.parse(two.stdout).sweep, two.stderr).toBe('two.png');
    // the PNG header's width and height (IHDR, bytes 16..23): as wide, taller
    const size = (f: string) => { const b = readFileSync(join(dir, f)); return [b.readUInt32BE(16), b.readUInt32BE(20)]; };
    expect(size('two.png')[0]).toBe(size('one.png')[0]);
    expect(size('two.png')[1]).toBeGreaterThan(size('one.png')[1]);
  });
});
