/**
 * The angular (equidistant) fisheye of dome masters (DESIGN.md "Fisheye convention"): radius from the
 * centre ∝ angle from the zenith; front of the dome at the bottom of the frame, viewer's right on the right.
 */
import type { ReadonlyVec3, Vec3 } from '../math.js';

/**
 * Unit direction → normalized fisheye (u, v) for a content field of view `fov` (radians):
 * θ = acos(v_z), ρ = 0.5·θ/(fov/2), u = 0.5 + ρ·v_x/√(v_x²+v_y²), v = 0.5 + ρ·v_y/√(v_x²+v_y²).
 * The zenith maps to the centre; directions below the fov's edge give ρ > 0.5 (outside the circle).
 */
export function directionToFisheye(out: [number, number], d: ReadonlyVec3, fov: number): [number, number] {
  const h = Math.sqrt(d[0] * d[0] + d[1] * d[1]);
  // atan2 rather than acos(z): acos loses half the digits within a hair of the zenith
  const theta = Math.atan2(h, d[2]);
  if (h < 1e-300) {
    // straight up (or down): azimuth undefined; the zenith is the centre
    out[0] = 0.5;
    out[1] = theta < 1 ? 0.5 : 0.5 + theta / fov;
    return out;
  }
  const k = theta / fov / h; // = (0.5·θ/(fov/2)) / h
  out[0] = 0.5 + k * d[0];
  out[1] = 0.5 + k * d[1];
  return out;
}

/** Normalized fisheye (u, v) → unit direction (any radius; ρ > 0.5 goes beyond the fov edge). */
export function fisheyeToDirection(out: Vec3, u: number, v: number, fov: number): Vec3 {
  const x = u - 0.5;
  const y = v - 0.5;
  const rho = Math.sqrt(x * x + y * y);
  const theta = rho * fov;
  if (rho < 1e-300) {
    out[0] = 0;
    out[1] = 0;
    out[2] = 1;
    return out;
  }
  const s = Math.sin(theta) / rho;
  out[0] = x * s;
  out[1] = y * s;
  out[2] = Math.cos(theta);
  return out;
}

/**
 * A world direction → the content's own frame, for content whose front is shown at dome azimuth
 * `azimuth` (radians, DESIGN.md "Fisheye convention", `content.azimuth`): a turn about +z by −azimuth,
 * so the world azimuth az becomes the content azimuth az − azimuth. `out` may be `d`.
 */
export function worldToContent(out: Vec3, d: ReadonlyVec3, azimuth: number): Vec3 {
  if (azimuth === 0) return out === d ? out : ((out[0] = d[0]), (out[1] = d[1]), (out[2] = d[2]), out);
  const c = Math.cos(azimuth);
  const s = Math.sin(azimuth);
  const x = d[0];
  const y = d[1];
  // azimuth is measured from +y toward +x: (x, y) = h·(sin az, cos az)
  out[0] = x * c - y * s;
  out[1] = y * c + x * s;
  out[2] = d[2];
  return out;
}

/** The inverse of worldToContent: a direction in the content's frame → the world. `out` may be `d`. */
export function contentToWorld(out: Vec3, d: ReadonlyVec3, azimuth: number): Vec3 {
  return worldToContent(out, d, -azimuth);
}

/** Angle from the zenith, radians, of normalized fisheye (u, v). */
export function fisheyeZenithAngle(u: number, v: number, fov: number): number {
  return Math.hypot(u - 0.5, v - 0.5) * fov;
}
