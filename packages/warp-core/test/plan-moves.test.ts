/** Moves in the room's words: the change from one rig to another as an operator makes it. */
import { describe, expect, it } from 'vitest';
import { planTestRig } from './plan-rigs.js';
import { deg, type Rig } from '../src/rig/model.js';
import { cloneRig } from '../src/rig/clone.js';
import { describeMoves } from '../src/placement/moves.js';

const rig = (): Rig => planTestRig({ lookAtZ: 0.1, resolution: [1920, 1200] });

describe('moves', () => {
  it('say toward the mirror, to the side as seen from behind the projector, and up or down', () => {
    const a = rig();
    const b = cloneRig(a);
    // the projector faces −y (the mirror): 14 cm toward it, 3 cm to its right (−x), 5 cm lower
    b.projector.position = [-0.03, -0.89, 0.05];
    b.projector.lookAt = [-0.03, -1.95, 0.05 + 1.06 * Math.tan(deg(2))];
    const moves = describeMoves(a, b);
    expect(moves.map((m) => [m.part, m.direction])).toEqual([
      ['projector', 'toward the mirror'],
      ['projector', 'to the right'],
      ['projector', 'lower'],
      ['aim', 'up'],
    ]);
    expect(moves[0].metres).toBeCloseTo(0.14, 12);
    expect(moves[1].metres).toBeCloseTo(0.03, 12);
    expect(moves[2].metres).toBeCloseTo(0.05, 12);
    expect(moves[3].degrees).toBeCloseTo(2, 9);
  });

  it('leave out what a tape cannot set, and name the mirror in the dome\'s directions', () => {
    const a = rig();
    const b = cloneRig(a);
    b.projector.position[0] += 0.002;
    b.mirror.center = [0.1, -1.9, 0.3];
    const moves = describeMoves(a, b);
    expect(moves.map((m) => `${m.part} ${m.direction} ${(m.metres ?? m.degrees)!.toFixed(3)}`)).toEqual(['mirror toward the front 0.050', 'mirror to the right 0.100', 'mirror higher 0.150']);
    expect(describeMoves(a, cloneRig(a))).toEqual([]);
  });
});
