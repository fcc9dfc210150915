/**
 * `bake --adaptive` (issue 11): the .glb and .obj as a restricted quadtree of triangles, the grid
 * formats regular; its figures beside the uniform grid's; the .glb passes the Khronos validator; warp
 * reads both back and draws what the exact trace draws within the tolerance.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
// @ts-expect-error gltf-validator ships no type declarations
import validator from 'gltf-validator';
import { readAnyGlb } from '@skyfold/warp-cli';
import { FIXTURES, skyfold, tempDir } from './support.js';

const dir = tempDir('bake-adaptive');
/** The 320 × 200 golden rig: a small projector puts much of its lit area beside the silhouette, so half-pixel smallest cells. */
const RIG = join(FIXTURES, 'golden', 'warp-rig-320x200.yaml');

describe('bake --adaptive', () => {
  let summary: any;
  beforeAll(async () => {
    const r = await skyfold(['bake', RIG, '--adaptive', '--smallest-cell', '0.5', '-o', join(dir, 'a.glb'), '-o', join(dir, 'a.obj'), '-o', join(dir, 'a.csv'), '--json']);
    expect(r.code, r.stderr).toBe(0);
    summary = JSON.parse(r.stdout);
  }, 120_000);

  it('meets the tolerance over 99.9% of the lit area with no more vertices than the uniform grid', () => {
    const a = summary.adaptive;
    expect(a.withinTolerance).toBeGreaterThanOrEqual(0.999);
    expect(a.vertices).toBeLessThanOrEqual(a.uniform.vertices);
    expect(a.uniform.vertices).toBe(summary.grid[0] * summary.grid[1]);
    expect(a.litPixels).toBe(a.uniform.litPixels);
    
  });

  it('writes a .glb the Khronos validator passes, holding the triangles', async () => {
    const bytes = new Uint8Array(readFileSync(join(dir, 'a.glb')));
    // Khronos glTF-Validator (npm gltf-validator), the reference checker of the glTF 2.0 specification
    const report = await validator.validateBytes(bytes);
    expect(report.issues.numErrors).toBe(0);
    expect(report.issues.numWarnings).toBe(0);
    const m = await readAnyGlb(bytes);
    expect(m.triangles?.x.length).toBe(summary.adaptive.vertices);
    expect(m.triangles?.indices.length).toBe(3 * summary.adaptive.triangles);
  });

  it('keeps the grid formats regular', () => {
    const lines = readFileSync(join(dir, 'a.csv'), 'utf8').trim().split('\n');
    expect(lines.length - 1).toBe(summary.grid[0] * summary.grid[1]);
  });

  it('warp reads the adaptive .glb and .obj back: the same frame from both', async () => {
    const { writeFileSync } = await import('node:fs');
    const sharp = (await import('sharp')).default;
    const data = Buffer.alloc(256 * 256 * 3);
    for (let j = 0; j < 256; j++) for (let i = 0; i < 256; i++) data.set([i, j, 200], (j * 256 + i) * 3);
    await sharp(data, { raw: { width: 256, height: 256, channels: 3 } }).png().toFile(join(dir, 'in.png'));
    const out: Buffer[] = [];
    for (const f of ['glb', 'obj']) {
      const r = await skyfold(['warp', join(dir, `a.${f}`), join(dir, 'in.png'), '-o', join(dir, f), '--jobs', '1']);
      expect(r.code, r.stderr).toBe(0);
      out.push((await sharp(join(dir, f, 'in.png')).raw().toBuffer({ resolveWithObject: true })).data);
    }
    let worst = 0;
    for (let k = 0; k < out[0].length; k++) worst = Math.max(worst, Math.abs(out[0][k] - out[1][k]));
    // OBJ's t = 1 − v may move a value on a rounding boundary by one code value
    expect(worst).toBeLessThanOrEqual(1);
    expect(out[0].some((x) => x > 0)).toBe(true);
  });

  it('--adaptive with only grid formats, and --smallest-cell without it, are refused in one line', async () => {
    const a = await skyfold(['bake', RIG, '--adaptive', '-o', join(dir, 'x.csv')]);
    expect(a.code).toBe(2);
    expect(a.stderr).toBe('skyfold: --adaptive: only .glb and .obj can carry an adaptive mesh (the other formats are grids by definition); give a .glb or .obj output\n');
    const b = await skyfold(['bake', RIG, '--smallest-cell', '2', '-o', join(dir, 'x.glb')]);
    expect(b.code).toBe(2);
    expect(b.stderr).toBe('skyfold: --smallest-cell: only with --adaptive\n');
  });
});
