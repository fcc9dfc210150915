/**
 * A .glb baked from an as-built dome (dome.mesh: FILE) stands alone (issue 11): it carries the dome's
 * triangles, so moved to another folder, without the mesh file beside it, every command reads the rig
 * from it with those triangles, and gives what the rig gives.
 */
import { mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { FIXTURES, skyfold, tempDir } from './support.js';

const dir = tempDir('glb-alone');
const vectors = JSON.parse(readFileSync(join(FIXTURES, 'vectors', 'vectors-c.json'), 'utf8'));
const PIXELS = ['--pixel', '700,500', '--pixel', '960,300', '--pixel', '20,20'];

describe('a .glb baked from a mesh-dome rig, moved away from the mesh file', () => {
  const elsewhere = join(dir, 'elsewhere');
  beforeAll(async () => {
    mkdirSync(join(dir, 'rig'));
    mkdirSync(elsewhere);
    writeFileSync(join(dir, 'rig', 'vectors-c-dome.obj'), readFileSync(join(FIXTURES, 'vectors', 'vectors-c-dome.obj')));
    writeFileSync(join(dir, 'rig', 'rig.json'), JSON.stringify({ name: 'vectors-c', ...vectors.rig }));
    const r = await skyfold(['bake', join(dir, 'rig', 'rig.json'), '-o', join(dir, 'rig', 'm.glb'), '--grid', '33x21']);
    expect(r.code, r.stderr).toBe(0);
    renameSync(join(dir, 'rig', 'm.glb'), join(elsewhere, 'm.glb'));
  });

  it('probe gives what the rig gives, from the triangles inside the .glb', async () => {
    const fromRig = await skyfold(['probe', join(dir, 'rig', 'rig.json'), '--json', ...PIXELS]);
    const fromGlb = await skyfold(['probe', join(elsewhere, 'm.glb'), '--json', ...PIXELS], { cwd: elsewhere });
    expect(fromGlb.stderr).toBe('');
    expect(fromGlb.code).toBe(0);
    const a = JSON.parse(fromRig.stdout).results;
    const b = JSON.parse(fromGlb.stdout).results;
    expect(b.map((x: any) => x.hit)).toEqual(a.map((x: any) => x.hit));
    // the .glb holds the dome's vertices as float32 metres: a hit moves by well under a micrometre
    let hits = 0;
    b.forEach((x: any, i: number) => {
      if (!x.fisheye) return;
      hits++;
      expect(Math.abs(x.fisheye[0] - a[i].fisheye[0])).toBeLessThan(1e-5);
      expect(Math.abs(x.fisheye[1] - a[i].fisheye[1])).toBeLessThan(1e-5);
      x.domePoint.forEach((c: number, j: number) => expect(Math.abs(c - a[i].domePoint[j])).toBeLessThan(1e-5));
    });
    expect(hits).toBeGreaterThan(0);
  });

  it('report runs on it', async () => {
    const r = await skyfold(['report', join(elsewhere, 'm.glb'), '-o', join(elsewhere, 'report'), '--rays', '1000', '--json'], { cwd: elsewhere });
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).facets).toBeDefined();
  });

  it('a .glb whose rig names an as-built dome but carries no triangles is refused in one line', async () => {
    // the same .glb with its dome mesh renamed, as a file from elsewhere might be
    const bytes = Buffer.from(readFileSync(join(elsewhere, 'm.glb')));
    const at = bytes.indexOf('as-built-dome');
    expect(at).toBeGreaterThan(0);
    let k = at;
    while ((k = bytes.indexOf('as-built-dome', k)) >= 0) bytes.write('as-built-xxxx', k++);
    writeFileSync(join(elsewhere, 'damaged.glb'), bytes);
    const r = await skyfold(['probe', join(elsewhere, 'damaged.glb'), '--pixel', '1,1']);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`skyfold: ${join(elsewhere, 'damaged.glb')}: its rig has an as-built dome (dome.mesh), but the .glb carries no "as-built-dome" triangles; re-bake it from the rig\n`);
  });
});
