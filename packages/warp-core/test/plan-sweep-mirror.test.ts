/** The placement sweep's mirror-height grid: there where the room or the plan frees the mirror's height, absent where it is fixed. */
import { describe, expect, it } from 'vitest';
import { planTestRig } from './plan-rigs.js';
import type { Rig, RoomModel } from '../src/rig/model.js';
import { mirrorHeightSpan, sweepPlacement } from '../src/placement/sweep.js';
import { resolveRoom } from '../src/placement/room.js';
import { NOMINAL_BODY } from '../src/placement/scoring.js';

const demo = (): Rig => planTestRig({ resolution: [96, 60] });
const roomOf = (rig: Rig, room: RoomModel) => resolveRoom(rig, { lensHeight: [0.4, 1.2], ...room }, [], NOMINAL_BODY);
const small = { distances: 3, heights: 2, mirrorHeights: 3, vertices: 150 };

describe('mirror-height sweep', () => {
  it('is absent where the mirror is fixed, at the edge with its height not searched, or along a level line', () => {
    const rig = demo();
    expect(sweepPlacement(rig, { ...small, vary: ['mirror.center', 'projector.position'] }, roomOf(rig, { mirror: { kind: 'fixed' } })).mirror).toBeNull();
    expect(sweepPlacement(rig, { ...small, vary: ['projector.position'] }, roomOf(rig, { mirror: { kind: 'edge' } })).mirror).toBeNull();
    const level = roomOf(rig, { mirror: { kind: 'along', from: [-1, -1.95, 0.15], to: [1, -1.95, 0.3] } });
    expect(mirrorHeightSpan(rig, level, [])).toBeNull(); // runs further than it rises
    const flatBox = roomOf(rig, { mirror: { kind: 'within', min: [-1, -2, 0.15], max: [1, -1.5, 0.15] } });
    expect(mirrorHeightSpan(rig, flatBox, ['mirror.center.z'])).toBeNull(); // the box gives no height to move in
  });

  it('follows a vertical-ish segment, its heights above the floor within the segment', () => {
    const rig = demo();
    // floor at z = -0.5: the segment runs from 0.3 m to 1.5 m above it, leaning 10 cm out
    const room = roomOf(rig, { mirror: { kind: 'along', from: [0, -1.95, -0.2], to: [0, -1.85, 1.0] } });
    const span = mirrorHeightSpan(rig, room, [])!;
    expect(span.lo).toBeCloseTo(0.3, 12);
    expect(span.hi).toBeCloseTo(1.5, 12);
    const mid = span.centerAt(0.9);
    expect(mid[1]).toBeCloseTo(-1.9, 12);
    expect(mid[2]).toBeCloseTo(0.4, 12);
    const s = sweepPlacement(rig, small, room);
    const m = s.mirror!;
    expect(m.heights).toHaveLength(3);
    expect(m.heights[0]).toBeCloseTo(0.3, 12);
    expect(m.heights[2]).toBeCloseTo(1.5, 12);
    expect(m.current).toEqual({ distance: s.current.distance, height: 0.65 });
    expect(m.coverage).toHaveLength(9);
    expect(m.coverage.some((c) => c !== null)).toBe(true);
    for (const c of m.coverage) if (c !== null) expect(c).toBeLessThanOrEqual(1);
  });

  it('spans a box of some height, and the physical bounds when --vary frees the centre at the edge', () => {
    const rig = demo();
    const boxed = mirrorHeightSpan(rig, roomOf(rig, { mirror: { kind: 'within', min: [-1, -2.1, 0], max: [1, -1.5, 0.4] } }), [])!;
    expect([boxed.lo, boxed.hi]).toEqual([0.5, 0.9]);
    const c = boxed.centerAt(0.7);
    expect([c[0], c[1]]).toEqual([0, -1.95]);
    expect(c[2]).toBeCloseTo(0.2, 12); // the box keeps x and y
    const edge = mirrorHeightSpan(rig, roomOf(rig, { mirror: { kind: 'edge' } }), ['mirror.center.z'])!;
    expect(edge.lo).toBeCloseTo(0.3, 12); // the mirror's radius above the floor
    expect(edge.hi).toBeCloseTo(2.7, 12); // the dome's top less the mirror's radius, from the floor
  });

  it('marks as forbidden what the room forbids, with no best cell where nothing is allowed', () => {
    const rig = demo();
    const room = roomOf(rig, { mirror: { kind: 'within', min: [-1, -2.1, 0], max: [1, -1.5, 0.4] }, leastLit: 0.98 });
    const m = sweepPlacement(rig, small, room).mirror!;
    expect(m.allowed.every((a) => !a)).toBe(true);
    expect(m.bestCell).toBeNull();
    const openSweep = sweepPlacement(rig, small, roomOf(rig, { mirror: { kind: 'within', min: [-1, -2.1, 0], max: [1, -1.5, 0.4] }, leastLit: 0, audience: null }));
    const open = openSweep.mirror!;
    expect(open.allowed.some((a) => a)).toBe(true);
    const k = open.score.findIndex((v, q) => open.allowed[q] && v === Math.max(...(open.score.filter((_, i) => open.allowed[i]) as number[])));
    expect(open.bestCell).toEqual({ distance: openSweep.distances[k % 3], height: open.heights[Math.floor(k / 3)] });
  });
});
