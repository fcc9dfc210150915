/** `skyfold plan` with the room: the rig's room section and the options that override it, and bad values refused. */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { FIXTURES, skyfold, tempDir } from './support.js';
import { readFileSync as readText } from 'node:fs';

/** The deliberately poor placement with a small projector: plan has something to improve. */
const poorRig = (w: number, h: number) => readText(join(FIXTURES, 'poor-placement.yaml'), 'utf8').replace('resolution: [1920, 1200]', `resolution: [${w}, ${h}]`);

const dir = tempDir('plan-room');
const ROOM = `
room:   # where things may go
  mirror:
    along: [[0, -1.95, 0], [0, -1.95, 0.6]]   # against the back wall, height free
  lensHeight: [0.45, 1.2]
  audience: { center: [0, 0.8], radius: 1.1 }
  leastLit: 0.3
`;

describe('plan in a room', () => {
  it("keeps to the rig file's room and writes the room back with its comments", async () => {
    writeFileSync(join(dir, 'rig.yaml'), poorRig(320, 200) + ROOM);
    const r = await skyfold(['plan', 'rig.yaml', '--vary', 'mirror.center', '--vary', 'projector.position', '--evaluations', '60', '--rays', '3000', '-o', 'best.yaml', '--json'], { cwd: dir });
    expect(r.code, r.stderr).toBe(0);
    const p = JSON.parse(r.stdout);
    expect(p.bounds['mirror.along']).toEqual([0, 1]);
    for (const c of p.best) {
      expect(c.rig.mirror.center[0]).toBeCloseTo(0, 9);
      expect(c.rig.mirror.center[1]).toBeCloseTo(-1.95, 9);
      expect(c.rig.projector.position[2] + 0.5).toBeGreaterThanOrEqual(0.45 - 1e-9);
      expect(c.figures.pixelsLit).toBeGreaterThanOrEqual(0.3);
    }
    const text = readFileSync(join(dir, 'best.yaml'), 'utf8');
    expect(text).toContain('# against the back wall, height free');
    expect(parse(text).room.leastLit).toBe(0.3);
  });

  it('takes the room as options, over the file', async () => {
    const r = await skyfold(['plan', 'rig.yaml', '--vary', 'mirror.center', '--mirror-place', 'fixed', '--vary', 'projector.position', '--lens-height', '50 cm,1', '--audience', 'none', '--least-lit', '0.2', '--evaluations', '40', '--rays', '3000', '-o', 'fixed.yaml', '--json'], { cwd: dir });
    expect(r.code, r.stderr).toBe(0);
    const p = JSON.parse(r.stdout);
    expect(Object.keys(p.bounds)).toEqual(['projector.position.x', 'projector.position.y', 'projector.position.z']);
    expect(p.bounds['projector.position.z']).toEqual([0, 0.5]);
    expect(p.notes.some((n: string) => n.includes('room.mirror is fixed'))).toBe(true);
  });

  it('refuses bad room options with exit 2 and one line', async () => {
    for (const [args, message] of [
      [['--mirror-place', 'wall'], '--mirror-place: expected fixed, edge, "along X,Y,Z X,Y,Z" or "within X,Y,Z X,Y,Z", got "wall"'],
      [['--lens-height', '1.2,0.4'], '--lens-height: expected LOW,HIGH above the floor, lowest first, got "1.2,0.4"'],
      [['--audience', '0,0'], '--audience: expected X,Y,RADIUS (a circle on the floor) or none, got "0,0"'],
      [['--least-lit', '2'], 'expected a number from 0 to 0.99, got "2"'],
    ] as const) {
      const r = await skyfold(['plan', 'rig.yaml', ...args], { cwd: dir });
      expect(r.code).toBe(2);
      expect(r.stderr).toContain(message);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
    }
  });
});
