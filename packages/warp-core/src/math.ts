/** Small numeric helpers shared by the optics. Clamp before acos/asin/sqrt so rounding never makes NaN. */

export type Vec3 = [number, number, number];
export type ReadonlyVec3 = readonly [number, number, number];

export const DEG = Math.PI / 180;
export const RAD = 180 / Math.PI;

export function clamp(x: number, lo: number, hi: number): number {
  return x < lo ? lo : x > hi ? hi : x;
}

/** acos that tolerates arguments a rounding step outside [−1, 1]. */
export function safeAcos(x: number): number {
  return Math.acos(x < -1 ? -1 : x > 1 ? 1 : x);
}

/** asin that tolerates arguments a rounding step outside [−1, 1]. */
export function safeAsin(x: number): number {
  return Math.asin(x < -1 ? -1 : x > 1 ? 1 : x);
}

/** sqrt of a quantity that is non-negative in exact arithmetic. */
export function safeSqrt(x: number): number {
  return x > 0 ? Math.sqrt(x) : 0;
}

/** Wraps degrees into [0, 360). */
export function wrapDegrees(a: number): number {
  const w = a % 360;
  return w < 0 ? (w + 360 === 360 ? 0 : w + 360) : w;
}

export function dot(a: ReadonlyVec3, b: ReadonlyVec3): number {
  return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

export function length(a: ReadonlyVec3): number {
  return Math.hypot(a[0], a[1], a[2]);
}

export function sub(a: ReadonlyVec3, b: ReadonlyVec3): Vec3 {
  return [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
}

export function add(a: ReadonlyVec3, b: ReadonlyVec3): Vec3 {
  return [a[0] + b[0], a[1] + b[1], a[2] + b[2]];
}

export function scale(a: ReadonlyVec3, s: number): Vec3 {
  return [a[0] * s, a[1] * s, a[2] * s];
}

export function cross(a: ReadonlyVec3, b: ReadonlyVec3): Vec3 {
  return [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
}

/** Unit vector along a; a must be non-zero. */
export function normalize(a: ReadonlyVec3): Vec3 {
  const l = length(a);
  return [a[0] / l, a[1] / l, a[2] / l];
}

/** Unit direction for azimuth/altitude in radians (azimuth 0 = +y front, 90° = +x right). */
export function directionFromAzAlt(az: number, alt: number): Vec3 {
  const c = Math.cos(alt);
  return [c * Math.sin(az), c * Math.cos(az), Math.sin(alt)];
}

/** Azimuth in [0, 2π) and altitude in radians of a unit direction. */
export function azAltFromDirection(d: ReadonlyVec3): [number, number] {
  let az = Math.atan2(d[0], d[1]);
  if (az < 0) az += 2 * Math.PI;
  if (az >= 2 * Math.PI) az = 0;
  // atan2 rather than asin(z): asin loses half the digits near the zenith
  return [az, Math.atan2(d[2], Math.hypot(d[0], d[1]))];
}

/** Angle between two unit vectors, accurate near 0 and π (2·atan2(|a−b|, |a+b|)). */
export function angleBetween(a: ReadonlyVec3, b: ReadonlyVec3): number {
  const dx = a[0] - b[0], dy = a[1] - b[1], dz = a[2] - b[2];
  const sx = a[0] + b[0], sy = a[1] + b[1], sz = a[2] + b[2];
  return 2 * Math.atan2(Math.sqrt(dx * dx + dy * dy + dz * dz), Math.sqrt(sx * sx + sy * sy + sz * sz));
}
