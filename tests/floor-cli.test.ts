// The floor is real (issue 12): every command refuses a rig whose mirror or projector stands below
// dome.floor, with exit 2 and the reason on one line; the school's mesh-dome rig stands above its floor.
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEMO_RIG, FIXTURES, skyfold, tempDir } from './support.js';

const dir = tempDir('floor');

function rigWith(from: string, to: string, name: string, source = DEMO_RIG): string {
  const text = readFileSync(source, 'utf8');
  const changed = text.replace(from, to);
  if (changed === text) throw new Error(`${source}: no "${from}" to change`);
  const path = join(dir, name);
  writeFileSync(path, changed);
  return path;
}

describe('a rig below its floor', () => {
  it('probe refuses a mirror sunk into the floor, naming the rig file and the reason (exit 2)', async () => {
    const rig = rigWith('center: [0, -1.95, 0.15]', 'center: [0, -1.95, -0.45]', 'low-mirror.yaml');
    const r = await skyfold(['probe', rig, '--pixel', '960,600']);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`skyfold: ${rig}: mirror: the mirror reaches 0.162 m below the floor (dome.floor puts the floor 0.5 m below the springline): raise the mirror or check dome.floor\n`);
  });

  it('bake refuses a projector whose lens is under the floor (exit 2)', async () => {
    const rig = rigWith('position: [0, -0.75, 0.1]', 'position: [0, -0.75, -0.55]', 'low-lens.yaml');
    const r = await skyfold(['bake', rig, '-o', join(dir, 'low.glb')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/projector\.position: the projector's lens is 0\.05 m below the floor/);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
  });

  it('the school dome (a mesh on a 2 ft wall) with its mirror stand sunk 3 ft: refused in feet and inches', async () => {
    const rig = rigWith('center: ["0 in", "-7 ft", "6 in"]', 'center: ["0 in", "-7 ft", "-2 ft 6 in"]', 'school-low.yaml', join(FIXTURES, 'school-dome-rig.yaml'));
    writeFileSync(join(dir, 'school-dome.obj'), readFileSync(join(FIXTURES, 'school-dome.obj')));
    const r = await skyfold(['probe', rig, '--pixel', '960,540']);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('mirror: the mirror reaches 1 ft 2.49 in below the floor (dome.floor puts the floor 2 ft 0 in below the springline)');
  });
});
