/** The convex spherical mirror (DESIGN.md "Mirror model"): first hit, cap test, reflection. */
import type { ReadonlyVec3, Vec3 } from '../math.js';
import type { MirrorModel } from '../rig/model.js';

/**
 * Distance along the ray o + t·d (d unit length) to its first intersection with the sphere, or −1 when
 * the ray misses it or the sphere lies behind the origin. Like three.js Ray.intersectSphere, but a
 * ray starting inside the sphere returns its exit point.
 */
export function raySphereFirstHit(o: ReadonlyVec3, d: ReadonlyVec3, center: ReadonlyVec3, radius: number): number {
  const ox = o[0] - center[0];
  const oy = o[1] - center[1];
  const oz = o[2] - center[2];
  const b = ox * d[0] + oy * d[1] + oz * d[2];
  const c = ox * ox + oy * oy + oz * oz - radius * radius;
  const disc = b * b - c;
  if (disc < 0) return -1; // the line passes the sphere by
  const s = Math.sqrt(disc);
  const t0 = -b - s;
  if (t0 >= 0) return t0; // entering from outside
  const t1 = -b + s;
  return t1 >= 0 ? t1 : -1; // inside: the exit; else the sphere is behind
}

/**
 * The cap's edge as a cosine: the unit outward normal n of a sphere point is on the reflective cap when
 * n·axis ≥ capCosine(m). The 1e-12 of slack keeps a point exactly on the edge on the cap despite rounding.
 */
export function capCosine(m: MirrorModel): number {
  return Math.cos(m.capAngle) - 1e-12;
}

/** True when the sphere point x lies on the reflective cap: (x − center)·axis ≥ r·capCosine. */
export function onCap(m: MirrorModel, x: ReadonlyVec3): boolean {
  const s = (x[0] - m.center[0]) * m.axis[0] + (x[1] - m.center[1]) * m.axis[1] + (x[2] - m.center[2]) * m.axis[2];
  return s >= m.radius * capCosine(m);
}

/**
 * Reflects d about the unit normal n: d′ = d − 2(d·n)n, written to out (out may alias d).
 * n must be unit length (as three.js Vector3.reflect requires).
 */
export function reflect(out: Vec3, d: ReadonlyVec3, n: ReadonlyVec3): Vec3 {
  const k = 2 * (d[0] * n[0] + d[1] * n[1] + d[2] * n[2]);
  out[0] = d[0] - k * n[0];
  out[1] = d[1] - k * n[1];
  out[2] = d[2] - k * n[2];
  return out;
}

/** Outward unit normal of the mirror sphere at a point on it. */
export function mirrorNormal(out: Vec3, m: MirrorModel, x: ReadonlyVec3): Vec3 {
  out[0] = (x[0] - m.center[0]) / m.radius;
  out[1] = (x[1] - m.center[1]) / m.radius;
  out[2] = (x[2] - m.center[2]) / m.radius;
  return out;
}
