/**
 * The change from one rig to another as an operator makes it: the projector moved toward or away from
 * the mirror, to its left or right (as seen from behind the projector), higher or lower; its aim turned
 * up or down, left or right; the mirror moved toward the front or the back, left or right, higher or lower.
 */
import { RAD, type ReadonlyVec3 } from '../math.js';
import type { Rig } from '../rig/model.js';

/** One step of a move: a length (metres) or a turn (degrees) in a direction of the room. */
export interface MoveStep {
  part: 'projector' | 'aim' | 'mirror' | 'mirror tilt';
  direction: string;
  metres?: number;
  degrees?: number;
}

/** Moves smaller than these are left out: below what a tape or a hand sets (common practice). */
export const MOVE_RESOLUTION = { metres: 0.005, degrees: 0.5 } as const;

function elevationAzimuth(v: ReadonlyVec3): [number, number] {
  const h = Math.hypot(v[0], v[1]);
  return [Math.atan2(v[2], h) * RAD, Math.atan2(v[0], v[1]) * RAD];
}

function turn(a: number, b: number): number {
  return ((((b - a) % 360) + 540) % 360) - 180;
}

/** The steps that take `before` to `after`, largest first within each part. */
export function describeMoves(before: Rig, after: Rig): MoveStep[] {
  const steps: MoveStep[] = [];
  const P0 = before.projector.position;
  const P1 = after.projector.position;
  const d = [P1[0] - P0[0], P1[1] - P0[1], P1[2] - P0[2]];
  // "toward the mirror" along the floor from where the projector stands now; "right" as seen from behind it
  let tx = before.mirror.center[0] - P0[0];
  let ty = before.mirror.center[1] - P0[1];
  const tl = Math.hypot(tx, ty);
  if (tl < 1e-9) [tx, ty] = [0, -1];
  else [tx, ty] = [tx / tl, ty / tl];
  const along = d[0] * tx + d[1] * ty;
  const side = d[0] * ty - d[1] * tx; // toward (ty, −tx): to the right when facing (tx, ty)
  const projector: MoveStep[] = [
    { part: 'projector', direction: along >= 0 ? 'toward the mirror' : 'away from the mirror', metres: Math.abs(along) },
    { part: 'projector', direction: side >= 0 ? 'to the right' : 'to the left', metres: Math.abs(side) },
    { part: 'projector', direction: d[2] >= 0 ? 'higher' : 'lower', metres: Math.abs(d[2]) },
  ];
  steps.push(...projector.filter((s) => s.metres! >= MOVE_RESOLUTION.metres));
  const f0 = [before.projector.lookAt[0] - P0[0], before.projector.lookAt[1] - P0[1], before.projector.lookAt[2] - P0[2]] as const;
  const f1 = [after.projector.lookAt[0] - P1[0], after.projector.lookAt[1] - P1[1], after.projector.lookAt[2] - P1[2]] as const;
  const [e0, a0] = elevationAzimuth(f0);
  const [e1, a1] = elevationAzimuth(f1);
  const up = e1 - e0;
  // azimuth grows clockwise seen from above: a turn to the right; meaningless near a vertical axis
  const right = Math.max(Math.abs(e0), Math.abs(e1)) > 80 ? 0 : turn(a0, a1);
  steps.push(
    ...[
      { part: 'aim' as const, direction: up >= 0 ? 'up' : 'down', degrees: Math.abs(up) },
      { part: 'aim' as const, direction: right >= 0 ? 'to the right' : 'to the left', degrees: Math.abs(right) },
    ].filter((s) => s.degrees >= MOVE_RESOLUTION.degrees),
  );
  const C0 = before.mirror.center;
  const C1 = after.mirror.center;
  const m = [C1[0] - C0[0], C1[1] - C0[1], C1[2] - C0[2]];
  steps.push(
    ...[
      { part: 'mirror' as const, direction: m[1] >= 0 ? 'toward the front' : 'toward the back', metres: Math.abs(m[1]) },
      { part: 'mirror' as const, direction: m[0] >= 0 ? 'to the right' : 'to the left', metres: Math.abs(m[0]) },
      { part: 'mirror' as const, direction: m[2] >= 0 ? 'higher' : 'lower', metres: Math.abs(m[2]) },
    ].filter((s) => s.metres >= MOVE_RESOLUTION.metres),
  );
  const [me0, ma0] = elevationAzimuth(before.mirror.axis);
  const [me1, ma1] = elevationAzimuth(after.mirror.axis);
  steps.push(
    ...[
      { part: 'mirror tilt' as const, direction: me1 >= me0 ? 'up' : 'down', degrees: Math.abs(me1 - me0) },
      { part: 'mirror tilt' as const, direction: turn(ma0, ma1) >= 0 ? 'to the right' : 'to the left', degrees: Math.abs(turn(ma0, ma1)) },
    ].filter((s) => s.degrees >= MOVE_RESOLUTION.degrees),
  );
  return steps;
}
