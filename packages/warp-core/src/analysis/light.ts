/**
 * Where light lands in the room: the dome (at or above the springline), the wall below it (the
 * dome sphere continued, DESIGN.md "Dome model") or the floor (`dome.floor` below the springline).
 * On an as-built dome the triangles are the dome and its skirt or wall (DESIGN.md "As-built domes").
 */
import type { ReadonlyVec3, Vec3 } from '../math.js';
import type { DomeMesh } from '../optics/dome-mesh.js';

export type Surface = 'dome' | 'wall' | 'floor';

export interface Landing {
  point: Vec3;
  surface: Surface;
  /** On an as-built dome: the light left through an opening (no triangle, and not the floor inside the dome), landing where the nominal sphere or the floor beyond would be. */
  throughOpening?: true;
}

/**
 * Where the ray from o (inside the dome) along unit d first meets the dome or the floor plane: the
 * triangles of `mesh` when the rig has one, else the dome sphere. A ray through an opening of the mesh
 * lands on the floor if it falls to it, else where the nominal sphere would be (the room beyond is unknown).
 */
export function landing(o: ReadonlyVec3, d: ReadonlyVec3, R: number, floor: number | undefined, mesh?: DomeMesh): Landing {
  if (mesh) {
    const t = mesh.firstHit(o, d);
    if (t >= 0) {
      if (floor !== undefined && d[2] < 0) {
        const tf = (-floor - o[2]) / d[2];
        if (tf < t) return { point: [o[0] + tf * d[0], o[1] + tf * d[1], -floor], surface: 'floor' };
      }
      const p: Vec3 = [o[0] + t * d[0], o[1] + t * d[1], o[2] + t * d[2]];
      return { point: p, surface: p[2] >= 0 ? 'dome' : 'wall' };
    }
    // no triangle: the floor within the dome's footprint (under a skirt, which has no floor triangles), else out through an opening
    const l = landing(o, d, R, floor);
    if (l.surface === 'floor' && Math.hypot(l.point[0], l.point[1]) <= R) return l;
    return { ...l, throughOpening: true };
  }
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
