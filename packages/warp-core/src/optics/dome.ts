/** The dome sphere about the origin (DESIGN.md "Dome model"). */
import type { ReadonlyVec3 } from '../math.js';

/**
 * Distance along o + t·d (d unit) to the sphere of radius R about the origin, going forward from a
 * point o inside it; −1 if o is outside and the ray misses.
 */
export function rayDomeExit(o: ReadonlyVec3, d: ReadonlyVec3, R: number): number {
  const b = o[0] * d[0] + o[1] * d[1] + o[2] * d[2];
  const c = o[0] * o[0] + o[1] * o[1] + o[2] * o[2] - R * R;
  const disc = b * b - c;
  if (disc < 0) return -1;
  const t = -b + Math.sqrt(disc);
  return t >= 0 ? t : -1;
}
