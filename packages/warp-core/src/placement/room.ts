/**
 * The room as the planner must respect it: where the mirror may go, how high the lens may stand, the
 * audience's part of the floor (no projector on it, and the beam between lens and mirror clear of the
 * eye heights over it), the least share of lit pixels and the largest body shadow. A rig's `room`
 * section, options and defaults merge here; `roomViolations` says by how much a placement breaks them.
 */
import type { Vec3 } from '../math.js';
import type { AudienceZone, EyeBandName, MirrorPlace, ProjectorBody, Rig, RoomModel } from '../rig/model.js';
import { projectorFrame } from '../optics/projector.js';
import { bodyCorners } from '../analysis/body.js';
import { EYE_BANDS } from '../analysis/safety.js';
import { vertexWeights, type FrameSample } from '../analysis/sample.js';
import { HitKind } from '../trace.js';
import { notice, type Notice } from '../notice.js';

/** `room.mirror: edge`: the mirror's centre at least this share of the dome radius from the dome's axis. */
export const EDGE_SHARE = 0.6;

/**
 * What the planner assumes of a room the rig does not describe. Lens heights from a low table to a tall
 * stand, 40 cm to 1.6 m above the floor (common practice); the audience on a circle about the dome's
 * centre of a quarter of its radius (a guess that keeps the middle free: give room.audience); a quarter
 * of the frame lit at least, and at most 1% of the dome in the body's shadow (the planner's own bar).
 */
export const ROOM_DEFAULTS = { lensHeight: [0.4, 1.6] as [number, number], audienceShare: 0.25, leastLit: 0.25, maxShadow: 0.01 } as const;

/**
 * A room that asks nothing beyond the physical bounds (parts inside the dome, above the floor, clear of
 * each other): the mirror anywhere, no audience zone, any lens height, any lit share.
 */
export const OPEN_ROOM: Readonly<RoomModel> = { mirror: { kind: 'within', min: [-1e4, -1e4, -1e4], max: [1e4, 1e4, 1e4] }, lensHeight: [0, 1e4], audience: null, leastLit: 0 };

/** The merged room, metres, with the floor the heights are measured from. */
export interface Room {
  mirror: MirrorPlace;
  /** Lens height above the floor, lowest and highest. */
  lensHeight: [number, number];
  audience: AudienceZone | null;
  leastLit: number;
  maxShadow: number;
  /** The floor's z in the world frame (negative: below the springline). */
  floorZ: number;
}

/** The rig's own `room`, overridden field by field by `options`, the rest from ROOM_DEFAULTS (each named in a note). */
export function resolveRoom(rig: Rig, options: RoomModel | undefined, notes: Notice[], assumedBody?: ProjectorBody): Room {
  const given: RoomModel = { ...rig.room, ...stripUndefined(options ?? {}) };
  const floorZ = rig.dome.floor !== undefined ? -rig.dome.floor : -0.5 * rig.dome.radius;
  const assumed: string[] = [];
  const lengths: Record<string, number> = {};
  if (given.mirror === undefined) assumed.push('the mirror stays at the edge (room.mirror: edge)');
  if (given.lensHeight === undefined) {
    assumed.push('the lens stands {length:low} to {length:high} above the floor (room.lensHeight)');
    lengths.low = ROOM_DEFAULTS.lensHeight[0];
    lengths.high = ROOM_DEFAULTS.lensHeight[1];
  }
  let audienceRadius = ROOM_DEFAULTS.audienceShare * rig.dome.radius;
  if (given.audience === undefined) {
    // no nearer the centre than the projector stands now: the current rig keeps its own floor
    audienceRadius = Math.min(audienceRadius, Math.max(0, distanceToFootprint(0, 0, footprint(rig, assumedBody)) - 0.1)); // twice the clearance, so the current stand keeps it
    assumed.push('the audience sits within {length:audience} of the dome centre (room.audience)');
    lengths.audience = audienceRadius;
  }
  if (given.leastLit === undefined) assumed.push(`at least ${ROOM_DEFAULTS.leastLit * 100}% of the projector's pixels light the content (room.leastLit)`);
  if (assumed.length) notes.push(notice('plan.room-assumed', `the rig has no room section for: ${assumed.join('; ')}`, { parameter: 'room', lengths }));
  return {
    mirror: given.mirror ?? { kind: 'edge' },
    lensHeight: given.lensHeight ?? [...ROOM_DEFAULTS.lensHeight],
    audience: given.audience === undefined ? (audienceRadius > 0 ? { center: [0, 0], radius: audienceRadius, eyes: EYE_BANDS.map((b) => b.name) } : null) : given.audience,
    leastLit: given.leastLit ?? ROOM_DEFAULTS.leastLit,
    maxShadow: given.maxShadow ?? ROOM_DEFAULTS.maxShadow,
    floorZ,
  };
}

function stripUndefined(o: RoomModel): RoomModel {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as RoomModel;
}

/** The point of the segment a → b nearest p, in the plane (x, y): its distance. */
function segmentDistance(px: number, py: number, ax: number, ay: number, bx: number, by: number): number {
  const dx = bx - ax;
  const dy = by - ay;
  const l2 = dx * dx + dy * dy;
  const t = l2 > 0 ? Math.max(0, Math.min(1, ((px - ax) * dx + (py - ay) * dy) / l2)) : 0;
  return Math.hypot(px - (ax + t * dx), py - (ay + t * dy));
}

/** Distance in plan view from p to the convex hull of `points` (0 inside it). */
export function distanceToFootprint(px: number, py: number, points: readonly (readonly number[])[]): number {
  let best = Infinity;
  for (let i = 0; i < points.length; i++) for (let j = i + 1; j < points.length; j++) best = Math.min(best, segmentDistance(px, py, points[i][0], points[i][1], points[j][0], points[j][1]));
  // inside the hull when p lies in some triangle of the points
  for (let i = 0; i < points.length; i++)
    for (let j = i + 1; j < points.length; j++)
      for (let k = j + 1; k < points.length; k++) {
        const [a, b, c] = [points[i], points[j], points[k]];
        const s1 = (b[0] - a[0]) * (py - a[1]) - (b[1] - a[1]) * (px - a[0]);
        const s2 = (c[0] - b[0]) * (py - b[1]) - (c[1] - b[1]) * (px - b[0]);
        const s3 = (a[0] - c[0]) * (py - c[1]) - (a[1] - c[1]) * (px - c[0]);
        if ((s1 >= 0 && s2 >= 0 && s3 >= 0) || (s1 <= 0 && s2 <= 0 && s3 <= 0)) {
          if (Math.abs(s1) + Math.abs(s2) + Math.abs(s3) > 0) return 0;
        }
      }
  return best;
}

/** The projector's corners (its body's, or the lens alone), for its footprint on the floor. */
function footprint(rig: Rig, assumedBody?: ProjectorBody): number[][] {
  try {
    return bodyCorners(rig.projector.body ?? assumedBody ?? { width: 0, length: 0, height: 0 }, projectorFrame(rig.projector));
  } catch {
    return [rig.projector.position]; // a degenerate aim is placementViolations' business
  }
}

/** Eye-height bands as z intervals in the world frame. */
function bandsZ(room: Room, names: readonly EyeBandName[]): [number, number][] {
  return EYE_BANDS.filter((b) => names.includes(b.name)).map((b) => [room.floorZ + b.from, room.floorZ + b.to]);
}

/**
 * The part [t0, t1] of the segment a → b whose plan view lies inside the circle (centre c, radius r),
 * or null when it stays outside.
 */
export function segmentInCircle(a: Readonly<Vec3>, b: Readonly<Vec3>, c: readonly [number, number], r: number): [number, number] | null {
  const dx = b[0] - a[0];
  const dy = b[1] - a[1];
  const fx = a[0] - c[0];
  const fy = a[1] - c[1];
  const A = dx * dx + dy * dy;
  const B = 2 * (fx * dx + fy * dy);
  const C = fx * fx + fy * fy - r * r;
  if (A < 1e-18) return C <= 0 ? [0, 1] : null; // a vertical segment: inside or not
  const disc = B * B - 4 * A * C;
  if (disc <= 0) return null;
  const q = Math.sqrt(disc);
  const t0 = Math.max(0, (-B - q) / (2 * A));
  const t1 = Math.min(1, (-B + q) / (2 * A));
  return t0 < t1 ? [t0, t1] : null;
}

export interface RoomCheck {
  total: number;
  reasons: string[];
}

/** By how much the placement's parts break the room (no trace needed): mirror place, lens height, the audience's floor. */
export function roomPlaceViolations(rig: Rig, room: Room, clearance: number): RoomCheck {
  const reasons: string[] = [];
  let total = 0;
  const add = (amount: number, why: string) => {
    if (amount > 1e-9) {
      total += amount;
      reasons.push(why);
    }
  };
  const C = rig.mirror.center;
  const m = room.mirror;
  if (m.kind === 'edge') add(EDGE_SHARE * rig.dome.radius - Math.hypot(C[0], C[1]), `the mirror must stay at the edge (its centre at least ${EDGE_SHARE * 100}% of the dome radius from the centre)`);
  else if (m.kind === 'within') {
    for (let a = 0; a < 3; a++) add(Math.max(m.min[a] - C[a], C[a] - m.max[a]), 'the mirror must stay within room.mirror.within');
  } else if (m.kind === 'along') {
    const d: Vec3 = [m.to[0] - m.from[0], m.to[1] - m.from[1], m.to[2] - m.from[2]];
    const l2 = d[0] * d[0] + d[1] * d[1] + d[2] * d[2];
    const t = Math.max(0, Math.min(1, ((C[0] - m.from[0]) * d[0] + (C[1] - m.from[1]) * d[1] + (C[2] - m.from[2]) * d[2]) / l2));
    add(Math.hypot(C[0] - m.from[0] - t * d[0], C[1] - m.from[1] - t * d[1], C[2] - m.from[2] - t * d[2]), 'the mirror must stay on room.mirror.along');
  }
  const height = rig.projector.position[2] - room.floorZ;
  add(room.lensHeight[0] - height, 'the lens is lower than room.lensHeight allows');
  add(height - room.lensHeight[1], 'the lens is higher than room.lensHeight allows');
  if (room.audience) {
    const a = room.audience;
    add(a.radius + clearance - distanceToFootprint(a.center[0], a.center[1], footprint(rig)), 'the projector must stand off the audience zone (room.audience)');
  }
  return { total, reasons };
}

/**
 * By how much the traced placement breaks the room: the beam between lens and mirror at eye height over
 * the audience zone (the deepest such run, metres of height), and a lit share below room.leastLit.
 */
export function roomLightViolations(s: FrameSample, room: Room): RoomCheck {
  const reasons: string[] = [];
  let total = 0;
  const n = s.kind.length;
  // weighted as report's pixel shares are (each vertex for its part of the frame)
  const weights = vertexWeights(s);
  let share = 0;
  for (let k = 0; k < n; k++) if (s.kind[k] === HitKind.Lit) share += weights[k];
  if (share < room.leastLit) {
    total += room.leastLit - share;
    reasons.push(`only ${(share * 100).toFixed(1)}% of the projector's pixels light the content (room.leastLit asks ${(room.leastLit * 100).toFixed(0)}%)`);
  }
  const a = room.audience;
  if (a && a.eyes.length) {
    const bands = bandsZ(room, a.eyes);
    const P = s.tracer.frame.origin;
    const X: Vec3 = [0, 0, 0];
    let worst = 0;
    for (let k = 0; k < n; k++) {
      if (s.kind[k] === HitKind.MirrorMiss) continue;
      X[0] = s.mirrorPoint[3 * k];
      X[1] = s.mirrorPoint[3 * k + 1];
      X[2] = s.mirrorPoint[3 * k + 2];
      const inside = segmentInCircle(P, X, a.center, a.radius);
      if (!inside) continue;
      const z0 = P[2] + inside[0] * (X[2] - P[2]);
      const z1 = P[2] + inside[1] * (X[2] - P[2]);
      const lo = Math.min(z0, z1);
      const hi = Math.max(z0, z1);
      for (const [b0, b1] of bands) {
        // how far the beam would have to move up or down to clear this band
        if (hi >= b0 && lo <= b1) worst = Math.max(worst, Math.min(hi - b0, b1 - lo) + 1e-3);
      }
    }
    if (worst > 0) {
      total += worst;
      reasons.push('the beam between lens and mirror runs at eye height over the audience zone');
    }
  }
  return { total, reasons };
}
