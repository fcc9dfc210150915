/** The placement sweep as a user gets it: a PNG from `plan --sweep`, and a picture of the report page. */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { sweepPlacement, rigFromDocument } from '@skyfold/warp-core';
import { parse } from 'yaml';
import { drawPlacementSweep } from '../packages/warp-cli/src/pictures/placement-sweep.js';
import { FIXTURES, skyfold, tempDir } from './support.js';

const dir = tempDir('plan-sweep');
const PNG = [0x89, 0x50, 0x4e, 0x47];

describe('placement sweep', () => {
  it('plan --sweep writes the chart as a PNG', async () => {
    writeFileSync(join(dir, 'rig.yaml'), readFileSync(join(FIXTURES, 'poor-placement.yaml'), 'utf8').replace('resolution: [1920, 1200]', 'resolution: [160, 100]'));
    const r = await skyfold(['plan', 'rig.yaml', '--vary', 'projector.position', '--evaluations', '30', '--rays', '2000', '--sweep', 'sweep.png', '--json'], { cwd: dir });
    expect(r.code, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout).sweep).toBe('sweep.png');
    expect([...readFileSync(join(dir, 'sweep.png')).subarray(0, 4)]).toEqual(PNG);
  });

  it('names its panels, its axes in the rig units, and the current and best placements', () => {
    const rig = rigFromDocument(parse(readFileSync(join(FIXTURES, 'demo-rig-ft.yaml'), 'utf8')));
    rig.projector.resolution = [160, 100];
    const pic = drawPlacementSweep(sweepPlacement(rig, { distances: 5, heights: 3, vertices: 200 }), rig.units);
    const texts = pic.labels.map((l) => l.text);
    for (const t of ['coverage', 'arcmin per pixel (median)', 'pixels lit']) expect(texts).toContain(t);
    expect(texts.some((t) => t.startsWith('ring: the current placement (3 ft 11') && t.includes('cross: best cell'))).toBe(true);
    expect(texts.some((t) => / ft /.test(t) && !t.startsWith('ring'))).toBe(true);
    expect(texts.some((t) => / m$/.test(t))).toBe(false);
  });
});
