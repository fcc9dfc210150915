/** The placement sweep: a grid of projector distances and heights, each scored as the planner scores a candidate. */
import { describe, expect, it } from 'vitest';
import { planTestRig } from './plan-rigs.js';
import type { Rig } from '../src/rig/model.js';
import { sweepPlacement } from '../src/placement/sweep.js';
import { OPEN_ROOM, resolveRoom } from '../src/placement/room.js';
import { NOMINAL_BODY } from '../src/placement/scoring.js';

const demo = (): Rig => planTestRig({ resolution: [192, 120] });

describe('placement sweep', () => {
  it('spans the distances to the wall and the room\'s lens heights, with the current placement where it stands', () => {
    const rig = demo();
    const room = resolveRoom(rig, { lensHeight: [0.4, 1.2] }, [], NOMINAL_BODY);
    const s = sweepPlacement(rig, { distances: 6, heights: 4, vertices: 300 }, room);
    expect(s.distances).toHaveLength(6);
    expect(s.heights[0]).toBeCloseTo(0.4, 12);
    expect(s.heights[3]).toBeCloseTo(1.2, 12);
    expect(s.distances[0]).toBeCloseTo(0.4, 12); // just clear of the mirror
    expect(s.distances[5]).toBeLessThanOrEqual(1.95 + 2.5);
    expect(s.current.distance).toBeCloseTo(1.2, 12);
    expect(s.current.height).toBeCloseTo(0.6, 12);
    expect(s.coverage).toHaveLength(24);
    for (const c of s.coverage) if (c !== null) expect(c).toBeLessThanOrEqual(1);
    // the best cell is an allowed one with the highest score
    const allowed = s.score.filter((_, k) => s.allowed[k]) as number[];
    const k = s.score.findIndex((v, q) => s.allowed[q] && v === Math.max(...allowed));
    expect(s.bestCell).toEqual({ distance: s.distances[k % 6], height: s.heights[Math.floor(k / 6)] });
  });

  it('marks as forbidden what the room forbids', () => {
    const rig = demo();
    const open = sweepPlacement(rig, { distances: 5, heights: 3, vertices: 300 }, resolveRoom(rig, { ...OPEN_ROOM, lensHeight: [0.4, 1.2] }, [], NOMINAL_BODY));
    const strict = sweepPlacement(rig, { distances: 5, heights: 3, vertices: 300 }, resolveRoom(rig, { lensHeight: [0.4, 1.2], leastLit: 0.98 }, [], NOMINAL_BODY));
    expect(strict.allowed.every((a) => !a)).toBe(true); // nowhere lights 98% of the frame
    expect(open.allowed.some((a) => a)).toBe(true);
    expect(strict.bestCell).toBeNull();
  });
});
