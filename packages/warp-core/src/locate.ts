/**
 * The inverse trace: a dome direction (from the content's eye) → the projector pixel that lights it.
 *
 * The reflection point lies in the plane of the lens P, the mirror centre C and the dome point D, so
 * the 3-D problem is Alhazen's problem on a circle: find the point X on the circle where the normal
 * bisects the directions to P and D. On the arc seen by both P and D the bisection residual changes
 * sign exactly once, so plain bisection finds it to machine precision without a starting guess — no
 * Newton step that could wander past the mirror's silhouette. The answer is then checked against the
 * forward trace. On an as-built dome the dome point is where the eye's ray meets the mesh.
 */
import { angleBetween, azAltFromDirection, directionFromAzAlt, dot, length, normalize, safeAcos, sub, type Vec3 } from './math.js';
import { onCap } from './optics/mirror.js';
import { insideFrame, rayToPixel } from './optics/projector.js';
import type { Tracer } from './trace.js';

export type LocateFailure = 'no-reflection' | 'cap' | 'behind-projector' | 'outside-frame' | 'unstable' | 'open';

export type LocateResult =
  | { pixel: [number, number]; mirrorPoint: Vec3; domePoint: Vec3 }
  | { pixel: null; failure: LocateFailure; reason: string; /** where the pixel would be, off the frame */ beyond?: [number, number] };

/** The point where the ray from `eye` along unit w leaves the dome sphere of radius R. */
export function domePointFromEye(eye: Vec3, w: Vec3, R: number): Vec3 {
  const b = dot(eye, w);
  const c = dot(eye, eye) - R * R;
  const s = -b + Math.sqrt(Math.max(0, b * b - c));
  return [eye[0] + s * w[0], eye[1] + s * w[1], eye[2] + s * w[2]];
}

/**
 * The dome point seen from the content's eye along unit w: on the sphere of `dome.radius`, or on an
 * as-built dome the first triangle the eye's ray meets going forward (null when it meets none: an
 * opening).
 */
export function domePointSeen(tracer: Tracer, w: Vec3): Vec3 | null {
  const { dome, content } = tracer.rig;
  if (!dome.mesh) return domePointFromEye(content.eye, w, dome.radius);
  const e = content.eye;
  const s = dome.mesh.firstHit(e, w, tracer.meshHoldsEye);
  return s < 0 ? null : [e[0] + s * w[0], e[1] + s * w[1], e[2] + s * w[2]];
}

/**
 * The mirror-sphere point where light from P reflects to D (both outside the sphere), or null when no
 * point of the sphere is seen by both.
 */
export function reflectionPoint(P: Vec3, C: Vec3, r: number, D: Vec3): Vec3 | null {
  const pc = sub(P, C);
  const dc = sub(D, C);
  const pl = length(pc);
  const dl = length(dc);
  if (!(pl > r && dl > r)) return null;
  const e1 = normalize(pc);
  const qx = dot(dc, e1);
  let m: Vec3 = [dc[0] - qx * e1[0], dc[1] - qx * e1[1], dc[2] - qx * e1[2]];
  let qy = length(m);
  if (qy < 1e-14 * dl) {
    // P, C and D on one line: any plane through it will do
    const t: Vec3 = Math.abs(e1[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0];
    const k = dot(t, e1);
    m = [t[0] - k * e1[0], t[1] - k * e1[1], t[2] - k * e1[2]];
    qy = 0;
  }
  const e2 = normalize(m);
  const phiQ = Math.atan2(qy, qx); // in [0, π]
  const alphaP = safeAcos(r / pl);
  const alphaQ = safeAcos(r / dl);
  const lo = Math.max(0, phiQ - alphaQ);
  const hi = Math.min(alphaP, phiQ);
  if (lo > hi) return null;
  // g(φ) = sin∠(n, P−X) + sin∠(n, D−X): ≥ 0 at lo, ≤ 0 at hi, zero where the angles are equal and opposite.
  const g = (phi: number): number => {
    const nx = Math.cos(phi);
    const ny = Math.sin(phi);
    const Xx = r * nx;
    const Xy = r * ny;
    const ax = pl - Xx;
    const ay = -Xy;
    const bx = qx - Xx;
    const by = qy - Xy;
    return (nx * ay - ny * ax) / Math.hypot(ax, ay) + (nx * by - ny * bx) / Math.hypot(bx, by);
  };
  let a = lo;
  let b = hi;
  let ga = g(a);
  if (ga === 0) b = a;
  for (let i = 0; i < 200 && b - a > 1e-16; i++) {
    const mid = 0.5 * (a + b);
    if (mid <= a || mid >= b) break;
    const gm = g(mid);
    if (gm === 0) {
      a = b = mid;
      break;
    }
    if (gm > 0 === ga > 0) {
      a = mid;
      ga = gm;
    } else b = mid;
  }
  const phi = 0.5 * (a + b);
  const c = Math.cos(phi) * r;
  const s = Math.sin(phi) * r;
  return [C[0] + c * e1[0] + s * e2[0], C[1] + c * e1[1] + s * e2[1], C[2] + c * e1[2] + s * e2[2]];
}

/**
 * Which projector pixel lights the dome direction (azimuth, altitude in radians, seen from the
 * content's eye), or why none does. `tolerance` (radians) bounds the forward-trace check.
 */
export function locateDirection(tracer: Tracer, azimuth: number, altitude: number, tolerance = 1e-9): LocateResult {
  const { rig, frame } = tracer;
  const w = directionFromAzAlt(azimuth, altitude);
  const D = domePointSeen(tracer, w);
  if (D === null) return { pixel: null, failure: 'open', reason: 'an opening of the as-built dome: no part of the dome lies in that direction' };
  const X = reflectionPoint(frame.origin, rig.mirror.center, rig.mirror.radius, D);
  if (X === null) return { pixel: null, failure: 'no-reflection', reason: "outside the mirror's reflected view: no point of the mirror sends the projector's light there" };
  if (!onCap(rig.mirror, X)) return { pixel: null, failure: 'cap', reason: "hidden by the cap: the mirror point that would light it lies outside the reflective cap (the mount or the mirror's back)" };
  const px = rayToPixel(frame, sub(X, frame.origin));
  if (px === null) return { pixel: null, failure: 'behind-projector', reason: 'the mirror point that would light it is behind the projector' };
  if (!insideFrame(frame, px[0], px[1])) return { pixel: null, failure: 'outside-frame', reason: "outside the projector's frame", beyond: px };
  const back = tracer.pixel(px[0], px[1]);
  if (back.kind === 'mirror-miss' || back.kind === 'open' || angleBetween(back.direction, w) > tolerance) {
    return { pixel: null, failure: 'unstable', reason: "at the mirror's silhouette: the light there grazes the mirror and no pixel lights it reliably" };
  }
  return { pixel: px, mirrorPoint: X, domePoint: D };
}

/** Azimuth and altitude (radians) of a dome point seen from the eye. */
export function azAltFromEye(eye: Vec3, point: Vec3): [number, number] {
  return azAltFromDirection(normalize(sub(point, eye)));
}
