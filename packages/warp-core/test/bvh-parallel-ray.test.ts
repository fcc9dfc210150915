/**
 * A ray parallel to a bounding-box slab and starting on its plane (0·∞ in the slab test): the eye at
 * the dome centre looking at azimuth 0 has x = 0 exactly, and a class I geodesic has its hubs on that
 * meridian, so boxes have x = 0 faces. The BVH must still find the triangle (a regression: `locate`
 * on the school dome called the dome's front an opening).
 */
import { describe, expect, it } from 'vitest';
import { DEG } from '../src/math.js';
import { geodesicDome } from '../src/optics/geodesic.js';
import { TriangleBvh } from '../src/optics/triangle-bvh.js';

/** Nearest hit by testing every triangle (Möller–Trumbore, either face), −1 for none. */
function bruteForce(p: Float64Array, idx: Uint32Array, o: number[], d: number[]): number {
  let best = Infinity;
  for (let t = 0; t < idx.length; t += 3) {
    const a = [p[3 * idx[t]], p[3 * idx[t] + 1], p[3 * idx[t] + 2]];
    const b = [p[3 * idx[t + 1]], p[3 * idx[t + 1] + 1], p[3 * idx[t + 1] + 2]];
    const c = [p[3 * idx[t + 2]], p[3 * idx[t + 2] + 1], p[3 * idx[t + 2] + 2]];
    const e1 = [b[0] - a[0], b[1] - a[1], b[2] - a[2]];
    const e2 = [c[0] - a[0], c[1] - a[1], c[2] - a[2]];
    const q = [d[1] * e2[2] - d[2] * e2[1], d[2] * e2[0] - d[0] * e2[2], d[0] * e2[1] - d[1] * e2[0]];
    const det = e1[0] * q[0] + e1[1] * q[1] + e1[2] * q[2];
    if (Math.abs(det) < 1e-15) continue;
    const s = [o[0] - a[0], o[1] - a[1], o[2] - a[2]];
    const u = (s[0] * q[0] + s[1] * q[1] + s[2] * q[2]) / det;
    const r = [s[1] * e1[2] - s[2] * e1[1], s[2] * e1[0] - s[0] * e1[2], s[0] * e1[1] - s[1] * e1[0]];
    const v = (d[0] * r[0] + d[1] * r[1] + d[2] * r[2]) / det;
    const tt = (e2[0] * r[0] + e2[1] * r[1] + e2[2] * r[2]) / det;
    if (u >= -1e-9 && v >= -1e-9 && u + v <= 1 + 1e-9 && tt > 1e-9 && tt < best) best = tt;
  }
  return best === Infinity ? -1 : best;
}

describe('BVH: rays parallel to a box face, starting on its plane', () => {
  const dome = geodesicDome({ frequency: 4, radius: 2.7432, keepAbove: 0, skirtTo: -0.6096 });
  const bvh = new TriangleBvh(dome.positions, dome.indices);

  it('from the centre toward azimuth 0 and 180 (x = 0 exactly) at several altitudes', () => {
    for (const az of [0, 180]) {
      for (const alt of [5, 30, 40, 60, 89]) {
        const d = [0, Math.cos(az * DEG) * Math.cos(alt * DEG), Math.sin(alt * DEG)];
        d[0] = 0; // exactly
        const t = bvh.firstHit(0, 0, 0, d[0], d[1], d[2], 1e-9, Infinity, false);
        expect(t, `azimuth ${az}, altitude ${alt}`).toBeGreaterThan(0);
        expect(t).toBeCloseTo(bruteForce(dome.positions, dome.indices, [0, 0, 0], d), 9);
      }
    }
  });

  it('straight up and level toward the front (two zero components)', () => {
    expect(bvh.firstHit(0, 0, 0, 0, 0, 1, 1e-9, Infinity, false)).toBeCloseTo(bruteForce(dome.positions, dome.indices, [0, 0, 0], [0, 0, 1]), 9);
    expect(bvh.firstHit(0, 0, 0, 0, 1, 0, 1e-9, Infinity, false)).toBeCloseTo(bruteForce(dome.positions, dome.indices, [0, 0, 0], [0, 1, 0]), 9);
  });
});
