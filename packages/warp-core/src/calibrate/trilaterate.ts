/**
 * A point from its distances to known points (a tape stretched from the mirror's pole to marks on the
 * dome's rim). Three distances: the closed-form intersection of three spheres, which has two mirror-image
 * answers about the plane of the three centres. More distances: least squares from those answers.
 */
import { add, cross, dot, length, scale, sub, type ReadonlyVec3, type Vec3 } from '../math.js';
import { levenbergMarquardt } from './levenberg-marquardt.js';

/**
 * The points at distances r1, r2, r3 from p1, p2, p3 (the intersection of three spheres; e.g. the
 * trilateration formulas in any surveying or geometry handbook). In the frame with p1 at the origin,
 * ex toward p2, ey in the plane toward p3: x = (r1² − r2² + d²)/2d, y = (r1² − r3² + i² + j²)/2j − (i/j)x,
 * z = ±√(r1² − x² − y²). Returns both answers (the + side of ex × ey first), equal when the spheres
 * only touch; null when the centres lie on one line or the spheres do not meet (z² below −tolerance·r1²).
 */
export function trilaterate(p1: ReadonlyVec3, p2: ReadonlyVec3, p3: ReadonlyVec3, r1: number, r2: number, r3: number, tolerance = 1e-9): [Vec3, Vec3] | null {
  const e21 = sub(p2, p1);
  const d = length(e21);
  if (!(d > 0)) return null;
  const ex = scale(e21, 1 / d);
  const e31 = sub(p3, p1);
  const i = dot(ex, e31);
  const eyRaw = sub(e31, scale(ex, i));
  const j = length(eyRaw);
  if (!(j > 1e-12 * Math.max(d, length(e31)))) return null; // collinear centres: a circle of answers
  const ey = scale(eyRaw, 1 / j);
  const ez = cross(ex, ey);
  const x = (r1 * r1 - r2 * r2 + d * d) / (2 * d);
  const y = (r1 * r1 - r3 * r3 + i * i + j * j) / (2 * j) - (i / j) * x;
  const z2 = r1 * r1 - x * x - y * y;
  if (z2 < -tolerance * r1 * r1) return null;
  const z = Math.sqrt(Math.max(0, z2));
  const base = add(p1, add(scale(ex, x), scale(ey, y)));
  return [add(base, scale(ez, z)), sub(base, scale(ez, z))];
}

export interface TrilaterationResult {
  point: Vec3;
  /** Root-mean-square distance misfit at the point. */
  rms: number;
}

/**
 * The point whose distances to `anchors` best match `distances` (least squares), starting from `start`.
 * Needs at least three anchors; weights are equal.
 */
export function trilaterateLeastSquares(anchors: readonly ReadonlyVec3[], distances: readonly number[], start: ReadonlyVec3): TrilaterationResult {
  const problem = {
    n: 3,
    steps: [1e-7, 1e-7, 1e-7],
    residuals: (p: Float64Array) => {
      const r = new Float64Array(anchors.length);
      for (let k = 0; k < anchors.length; k++) r[k] = Math.hypot(p[0] - anchors[k][0], p[1] - anchors[k][1], p[2] - anchors[k][2]) - distances[k];
      return r;
    },
  };
  const fit = levenbergMarquardt(problem, start);
  return { point: [fit.p[0], fit.p[1], fit.p[2]], rms: Math.sqrt(fit.cost / anchors.length) };
}

/**
 * Closed form from the best-spread three anchors, then least squares over all of them from each of the
 * two answers; of the two results, the one with the smaller misfit, or, when the data cannot tell them
 * apart (all anchors in one plane), the one nearer `prefer`. Null when no three anchors give an answer.
 */
export function locatePoint(anchors: readonly ReadonlyVec3[], distances: readonly number[], prefer: ReadonlyVec3): TrilaterationResult | null {
  if (anchors.length < 3) return null;
  let best: [number, number, number] | null = null;
  let bestArea = 0;
  for (let a = 0; a < anchors.length; a++) {
    for (let b = a + 1; b < anchors.length; b++) {
      for (let c = b + 1; c < anchors.length; c++) {
        const area = length(cross(sub(anchors[b], anchors[a]), sub(anchors[c], anchors[a])));
        if (area > bestArea) {
          bestArea = area;
          best = [a, b, c];
        }
      }
    }
  }
  if (!best) return null;
  const [a, b, c] = best;
  // noisy tapes can leave the spheres just short of meeting: accept a small negative z²
  const pair = trilaterate(anchors[a], anchors[b], anchors[c], distances[a], distances[b], distances[c], 0.05);
  if (!pair) return null;
  const candidates = pair.map((p) => (anchors.length > 3 ? trilaterateLeastSquares(anchors, distances, p) : { point: p, rms: 0 }));
  const [c0, c1] = candidates;
  const scaleLen = distances.reduce((m, d) => (d > m ? d : m), 1e-9);
  const tied = Math.abs(c0.rms - c1.rms) <= 1e-6 * scaleLen || length(sub(c0.point, c1.point)) <= 1e-9 * scaleLen;
  if (!tied) return c0.rms < c1.rms ? c0 : c1;
  return length(sub(c0.point, prefer)) <= length(sub(c1.point, prefer)) ? c0 : c1;
}
