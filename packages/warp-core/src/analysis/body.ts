/**
 * The projector's own body (a box behind the lens, DESIGN.md rig `projector.body`): does a segment of
 * reflected light pass through it? The lens sits at the centre of the box's front face.
 */
import type { ReadonlyVec3 } from '../math.js';
import type { ProjectorFrame } from '../optics/projector.js';
import type { ProjectorBody } from '../rig/model.js';

/**
 * True when the segment a → b passes through the body (slab test in the projector's axes: right,
 * up, forward; the box spans |x| ≤ w/2, |y| ≤ h/2, −length ≤ z ≤ 0). A segment that only touches
 * the lens point (z = 0 at the lens) counts as blocked: light aimed back at the lens hits the lens.
 */
export function segmentHitsBody(body: ProjectorBody, f: ProjectorFrame, a: ReadonlyVec3, b: ReadonlyVec3): boolean {
  const o = f.origin;
  const ax = a[0] - o[0], ay = a[1] - o[1], az = a[2] - o[2];
  const dx = b[0] - a[0], dy = b[1] - a[1], dz = b[2] - a[2];
  const p = [ax * f.right[0] + ay * f.right[1] + az * f.right[2], ax * f.up[0] + ay * f.up[1] + az * f.up[2], ax * f.forward[0] + ay * f.forward[1] + az * f.forward[2]];
  const d = [dx * f.right[0] + dy * f.right[1] + dz * f.right[2], dx * f.up[0] + dy * f.up[1] + dz * f.up[2], dx * f.forward[0] + dy * f.forward[1] + dz * f.forward[2]];
  const lo = [-body.width / 2, -body.height / 2, -body.length];
  const hi = [body.width / 2, body.height / 2, 0];
  let t0 = 0;
  let t1 = 1;
  for (let i = 0; i < 3; i++) {
    if (Math.abs(d[i]) < 1e-15) {
      if (p[i] < lo[i] || p[i] > hi[i]) return false; // parallel to this slab and outside it
      continue;
    }
    let ta = (lo[i] - p[i]) / d[i];
    let tb = (hi[i] - p[i]) / d[i];
    if (ta > tb) [ta, tb] = [tb, ta];
    if (ta > t0) t0 = ta;
    if (tb < t1) t1 = tb;
    if (t0 > t1) return false;
  }
  return true;
}

/** The eight corners of the body box in world coordinates. */
export function bodyCorners(body: ProjectorBody, f: ProjectorFrame): [number, number, number][] {
  const out: [number, number, number][] = [];
  for (const sx of [-0.5, 0.5])
    for (const sy of [-0.5, 0.5])
      for (const sz of [0, -1]) {
        const x = sx * body.width;
        const y = sy * body.height;
        const z = sz * body.length;
        out.push([0, 1, 2].map((i) => f.origin[i] + x * f.right[i] + y * f.up[i] + z * f.forward[i]) as [number, number, number]);
      }
  return out;
}
