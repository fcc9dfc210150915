/**
 * The room as the planner respects it: the rig's `room` section read and refused as other sections are,
 * and plans that never leave the mirror's place, the lens heights, the audience's floor, the eye
 * heights over it or the least lit share (checked here independently of the planner's own test).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { deg, validateRigGeometry, type Rig, type RoomModel } from '../src/rig/model.js';
import { rigFromDocument, rigToDocument } from '../src/rig/document.js';
import { planRig } from '../src/placement/plan.js';
import { EDGE_SHARE } from '../src/placement/room.js';
import { EYE_BANDS } from '../src/analysis/safety.js';
import { Tracer } from '../src/trace.js';
import { bodyCorners } from '../src/analysis/body.js';
import { projectorFrame } from '../src/optics/projector.js';

const BASE = {
  units: 'cm',
  dome: { diameter: 500, floor: 50 },
  mirror: { radius: 30, center: [0, -195, 15], axis: [0, 1, 1] },
  projector: { position: [0, -75, 10], lookAt: [0, -195, 25], resolution: [192, 120], throwRatio: 1.6 },
};

describe('the room section', () => {
  it('is read in the rig units and written back', () => {
    const room = { mirror: { along: [[0, -195, 0], [0, -195, 60]] }, lensHeight: [45, 120], audience: { center: [0, 80], radius: 110, eyes: ['seated'] }, leastLit: 0.3, maxShadow: 0.02 };
    const rig = rigFromDocument({ ...BASE, room });
    expect(rig.room!.mirror).toEqual({ kind: 'along', from: [0, -1.95, 0], to: [0, -1.95, 0.6] });
    expect(rig.room!.lensHeight).toEqual([0.45, 1.2]);
    expect(rig.room!.audience).toEqual({ center: [0, 0.8], radius: 1.1, eyes: ['seated'] });
    expect(rigFromDocument(rigToDocument(rig)).room).toEqual(rig.room);
    expect(rigFromDocument({ ...BASE, room: { mirror: 'fixed', audience: 'none' } }).room).toEqual({ mirror: { kind: 'fixed' }, audience: null });
    expect(rigFromDocument({ ...BASE, room: { mirror: { within: [[10, -150, 60], [-10, -220, 0]] } } }).room!.mirror).toEqual({ kind: 'within', min: [-0.1, -2.2, 0], max: [0.1, -1.5, 0.6] });
  });

  it('refuses unknown and wrong fields, naming them', () => {
    const bad = (room: unknown) => () => rigFromDocument({ ...BASE, room });
    expect(bad({ mirorr: 'fixed' })).toThrow('room.mirorr: unknown field; did you mean "mirror"?');
    expect(bad({ mirror: 'wall' })).toThrow('room.mirror: expected fixed, edge, {along: [A, B]} or {within: [A, B]}, got "wall"');
    expect(bad({ mirror: { along: [[0, 0, 0]] } })).toThrow('room.mirror.along: expected two points [[x, y, z], [x, y, z]], got [[0,0,0]]');
    expect(bad({ mirror: { along: [[0, 0, 0], [0, 0, 0]] } })).toThrow('room.mirror.along: its two ends must differ');
    expect(bad({ lensHeight: [120, 45] })).toThrow('room.lensHeight: expected the lowest height first, got [120,45]');
    expect(bad({ audience: { center: [0, 0], radius: 100, eyes: ['lying'] } })).toThrow('room.audience.eyes: expected a list of floor-seated, seated, standing, got ["lying"]');
    expect(bad({ audience: { center: [0, 0] } })).toThrow('room.audience.radius: is missing');
    expect(bad({ leastLit: 1.5 })).toThrow('room.leastLit: expected a share from 0 to below 1 (0.25 = a quarter of the pixels), got 1.5');
  });
});

function demo(): Rig {
  const s = Math.SQRT1_2;
  const rig: Rig = {
    units: 'm',
    dome: { radius: 2.5, floor: 0.5 },
    mirror: { center: [0, -1.95, 0.15], radius: 0.3, axis: [0, s, s], capAngle: deg(90) },
    projector: { position: [0, -0.75, 0.1], lookAt: [0, -1.95, 0.25], roll: 0, resolution: [192, 120], throwRatio: 1.6, lensShift: [0, 0] },
    content: { fov: deg(180), eye: [0, 0, 0] },
  };
  validateRigGeometry(rig);
  return rig;
}

const NOMINAL_BODY = { width: 0.35, length: 0.3, height: 0.15 };

/** Does the beam from the lens to the mirror run at eye height over the circle? Walked in 1 cm steps over a pixel grid. */
function beamAtEyes(rig: Rig, room: RoomModel): boolean {
  const a = room.audience!;
  const tracer = new Tracer(rig);
  const [W, H] = rig.projector.resolution;
  const P = rig.projector.position;
  const bands = EYE_BANDS.filter((b) => a.eyes.includes(b.name)).map((b) => [b.from - rig.dome.floor!, b.to - rig.dome.floor!]);
  for (let j = 0; j <= 12; j++)
    for (let i = 0; i <= 12; i++) {
      const t = tracer.pixel((i / 12) * W, (j / 12) * H);
      if (t.kind === 'mirror-miss') continue;
      const X = t.mirrorPoint;
      const steps = Math.ceil(Math.hypot(X[0] - P[0], X[1] - P[1], X[2] - P[2]) / 0.01);
      for (let q = 0; q <= steps; q++) {
        const p = [0, 1, 2].map((k) => P[k] + ((X[k] - P[k]) * q) / steps);
        if (Math.hypot(p[0] - a.center[0], p[1] - a.center[1]) >= a.radius) continue;
        if (bands.some(([lo, hi]) => p[2] > lo + 1e-3 && p[2] < hi - 1e-3)) return true;
      }
    }
  return false;
}

describe('plans keep to the room', () => {
  it('never place the mirror, the lens or the beam where the room forbids, nor light too little (property)', () => {
    let checked = 0;
    fc.assert(
      fc.property(
        fc.record({
          seed: fc.integer({ min: 1, max: 1000 }),
          place: fc.constantFrom('along', 'within', 'edge', 'fixed'),
          low: fc.double({ min: 0.3, max: 0.8, noNaN: true }),
          rise: fc.double({ min: 0.1, max: 0.8, noNaN: true }),
          audience: fc.double({ min: 0.3, max: 1.0, noNaN: true }),
          leastLit: fc.double({ min: 0.2, max: 0.4, noNaN: true }),
        }),
        ({ seed, place, low, rise, audience, leastLit }) => {
          const mirror: RoomModel['mirror'] =
            place === 'along' ? { kind: 'along', from: [-0.4, -1.95, 0], to: [0.4, -1.95, 0.5] } : place === 'within' ? { kind: 'within', min: [-0.6, -2.1, -0.1], max: [0.6, -1.7, 0.5] } : { kind: place };
          const room: RoomModel = { mirror, lensHeight: [low, low + rise], audience: { center: [0, 0.3], radius: audience, eyes: ['floor-seated', 'seated', 'standing'] }, leastLit };
          const rig = demo();
          const p = planRig(rig, { vary: ['mirror.center', 'projector.position'], evaluations: 60, keep: 2, seed, vertices: 300, refineVertices: 1200, reportVertices: 1200, room });
          for (const c of p.best) {
            checked++;
            const C = c.rig.mirror.center;
            if (place === 'fixed') expect(C).toEqual(rig.mirror.center);
            if (place === 'edge') expect(Math.hypot(C[0], C[1])).toBeGreaterThanOrEqual(EDGE_SHARE * 2.5 - 1e-9);
            if (place === 'within') for (let k = 0; k < 3; k++) expect(C[k] >= [-0.6, -2.1, -0.1][k] - 1e-9 && C[k] <= [0.6, -1.7, 0.5][k] + 1e-9).toBe(true);
            if (place === 'along') {
              // on the segment: C = from + t (to − from) for one t in [0, 1]
              const t = (C[0] + 0.4) / 0.8;
              expect(t).toBeGreaterThanOrEqual(-1e-9);
              expect(t).toBeLessThanOrEqual(1 + 1e-9);
              expect(C[1]).toBeCloseTo(-1.95, 9);
              expect(C[2]).toBeCloseTo(0.5 * t, 9);
            }
            const height = c.rig.projector.position[2] + 0.5;
            expect(height).toBeGreaterThanOrEqual(low - 1e-9);
            expect(height).toBeLessThanOrEqual(low + rise + 1e-9);
            for (const corner of bodyCorners(NOMINAL_BODY, projectorFrame(c.rig.projector))) expect(Math.hypot(corner[0], corner[1] - 0.3)).toBeGreaterThan(audience);
            expect(c.figures.pixelsLit!).toBeGreaterThanOrEqual(leastLit);
            expect(beamAtEyes(c.rig, room)).toBe(false);
          }
        },
      ),
      { numRuns: 6, seed: 14 },
    );
    expect(checked).toBeGreaterThan(2); // the runs found candidates to check
  });

  it('aims the projector at the mirror as the mirror moves, unless the aim is searched', () => {
    const rig = demo();
    const p = planRig(rig, { vary: ['mirror.center.z'], evaluations: 30, keep: 1, vertices: 300, refineVertices: 1200, reportVertices: 1200, room: { mirror: { kind: 'along', from: [0, -1.95, 0], to: [0, -1.95, 0.6] }, audience: null } });
    const best = p.best[0];
    expect(best.rig.mirror.center[2]).not.toBe(0.15);
    // lookAt moved with the mirror: the same point of the mirror stays on the lens axis
    for (let k = 0; k < 3; k++) expect(best.rig.projector.lookAt[k] - best.rig.mirror.center[k]).toBeCloseTo(rig.projector.lookAt[k] - rig.mirror.center[k], 12);
  });
});
