/** `planRig`: finds a known best placement and never proposes one that breaks a bound. */
import { describe, expect, it } from 'vitest';
import { deg, validateRigGeometry, type Rig } from '../src/rig/model.js';
import { length } from '../src/math.js';
import { planRig } from '../src/placement/plan.js';
import { placementViolations } from '../src/placement/scoring.js';
import { OPEN_ROOM } from '../src/placement/room.js';

/** These cases are about the physical bounds alone: no room beyond them. */
const room = OPEN_ROOM;

function rig(over: (r: Rig) => void = () => {}): Rig {
  const s = Math.SQRT1_2;
  const g: Rig = {
    units: 'm',
    dome: { radius: 2.5, floor: 0.5 },
    mirror: { center: [0, -1.95, 0.15], radius: 0.3, axis: [0, s, s], capAngle: deg(90) },
    projector: { position: [0, -0.75, 0.1], lookAt: [0, -1.95, 0.25], roll: 0, resolution: [1920, 1200], throwRatio: 1.6, lensShift: [0, 0] },
    content: { fov: deg(180), eye: [0, 0, 0] },
  };
  over(g);
  validateRigGeometry(g);
  return g;
}

describe('plan', () => {
  it('finds the known best: a long-throw lens as far from the mirror as its body allows', () => {
    // With a throw ratio of 12 the frame stays inside the mirror's outline at any distance, so the lit
    // share grows with the distance (checked by the scan below) until the projector's body meets the
    // dome: the lens at y* = √(R² − (w/2)² − (z + h/2)²) − length, its body's far corner on the sphere.
    const body = { width: 0.1, length: 0.1, height: 0.05 };
    const g = rig((r) => ((r.projector.throwRatio = 12), (r.projector.body = body)));
    const yStar = Math.sqrt(2.5 ** 2 - 0.05 ** 2 - (0.1 + 0.025) ** 2) - body.length;
    const p = planRig(g, { vary: ['projector.position.y'], objective: 'coverage', evaluations: 100, seed: 3, room, refineVertices: 4000, reportVertices: 4000 });
    expect(p.best.length).toBeGreaterThan(0);
    expect(Math.abs(p.best[0].rig.projector.position[1] - yStar)).toBeLessThan(0.02);
    expect(p.best[0].figures.coverage!).toBeGreaterThan(p.current.figures.coverage! * 3);
    // the scan: coverage rises toward y*
    const cov = (y: number) => planRig(rig((r) => ((r.projector.throwRatio = 12), (r.projector.body = body), (r.projector.position = [0, y, 0.1]))), { vary: ['projector.position.y'], evaluations: 12, keep: 1, room, refineVertices: 4000, reportVertices: 4000 }).current.figures.coverage!;
    expect(cov(1)).toBeLessThan(cov(2));
    expect(cov(2)).toBeLessThan(cov(yStar - 0.01));
  });

  it('is deterministic for a seed', () => {
    const g = rig((r) => (r.projector.position = [0, -1.3, 0.1]));
    const a = planRig(g, { vary: ['projector.position'], evaluations: 40, seed: 11, refineVertices: 2000, reportVertices: 2000 });
    const b = planRig(g, { vary: ['projector.position'], evaluations: 40, seed: 11, refineVertices: 2000, reportVertices: 2000 });
    expect(a.best.map((c) => c.values)).toEqual(b.best.map((c) => c.values));
  });

  it('never proposes a placement that breaks a bound, and improves a poor one', () => {
    const poor = rig((r) => ((r.projector.position = [0, -1.3, 0.1]), (r.projector.lookAt = [0, -1.95, 0.15])));
    const p = planRig(poor, { vary: ['mirror.center', 'projector.position'], objective: 'balanced', evaluations: 240, seed: 5, room, refineVertices: 4000, reportVertices: 4000 });
    expect(p.best.length).toBeGreaterThan(0);
    for (const c of p.best) {
      const body = { width: 0.35, length: 0.3, height: 0.15 }; // the nominal body the planner assumes
      expect(placementViolations({ ...c.rig, projector: { ...c.rig.projector, body } }).total).toBe(0);
      expect(() => validateRigGeometry(c.rig)).not.toThrow();
      expect(length(c.rig.mirror.center) + c.rig.mirror.radius).toBeLessThan(2.5);
      expect(c.rig.mirror.center[2] - c.rig.mirror.radius).toBeGreaterThanOrEqual(-0.5);
      expect(c.rig.projector.position[2]).toBeGreaterThanOrEqual(-0.5);
      for (const [k, v] of Object.entries(c.values)) {
        expect(v).toBeGreaterThanOrEqual(p.bounds[k][0] - 1e-9);
        expect(v).toBeLessThanOrEqual(p.bounds[k][1] + 1e-9);
      }
      expect(c.figures.bodyShadow!).toBeLessThanOrEqual(0.01);
    }
    expect(p.best[0].figures.score!).toBeGreaterThan(p.current.figures.score!);
  });

  it('refuses a field it cannot vary, naming it', () => {
    expect(() => planRig(rig(), { vary: ['mirror.radius'] })).toThrow(/cannot vary "mirror.radius"/);
  });
});
