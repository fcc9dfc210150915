/**
 * The small invented rig the planner tests share: a 5 m dome on a 0.5 m floor, a 60 cm
 * hemispherical mirror at the back wall tilted 45° up, the projector in front of it facing it.
 * Each test picks the projector's distance, its aim's height and the resolution it needs.
 */
import type { Vec3 } from '../src/math.js';
import { deg, validateRigGeometry, type Rig } from '../src/rig/model.js';

export interface PlanRigOptions {
  /** Projector position (default 1.2 m in front of the mirror, 10 cm above the dome's centre height). */
  position?: Vec3;
  /** Height the projector aims at on the mirror's line (default 0.25). */
  lookAtZ?: number;
  resolution?: [number, number];
}

export function planTestRig(o: PlanRigOptions = {}): Rig {
  const s = Math.SQRT1_2;
  const rig: Rig = {
    units: 'm',
    dome: { radius: 2.5, floor: 0.5 },
    mirror: { center: [0, -1.95, 0.15], radius: 0.3, axis: [0, s, s], capAngle: deg(90) },
    projector: { position: o.position ?? [0, -0.75, 0.1], lookAt: [0, -1.95, o.lookAtZ ?? 0.25], roll: 0, resolution: o.resolution ?? [160, 100], throwRatio: 1.6, lensShift: [0, 0] },
    content: { fov: deg(180), eye: [0, 0, 0] },
  };
  validateRigGeometry(rig);
  return rig;
}
