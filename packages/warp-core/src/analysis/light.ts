/**
 * Where light lands in the room: the dome (at or above the springline), the wall below it (the
 * dome sphere continued, DESIGN.md "Dome model") or the floor (`dome.floor` below the springline).
 */
import type { ReadonlyVec3, Vec3 } from '../math.js';

export type Surface = 'dome' | 'wall' | 'floor';

export interface Landing {
  point: Vec3;
  surface: Surface;
}

/** Where the ray from o (inside the dome) along unit d first meets the dome sphere or the floor plane. */
export function landing(o: ReadonlyVec3, d: ReadonlyVec3, R: number, floor: number | undefined): Landing {
  const b = o[0] * d[0] + o[1] * d[1] + o[2] * d[2];
  const c = o[0] * o[0] + o[1] * o[1] + o[2] * o[2] - R * R;
  const s = -b + Math.sqrt(Math.max(0, b * b - c));
  const p: Vec3 = [o[0] + s * d[0], o[1] + s * d[1], o[2] + s * d[2]];
  if (floor !== undefined && p[2] < -floor && d[2] < 0) {
    const t = (-floor - o[2]) / d[2];
    return { point: [o[0] + t * d[0], o[1] + t * d[1], -floor], surface: 'floor' };
  }
  return { point: p, surface: p[2] >= 0 ? 'dome' : 'wall' };
}
