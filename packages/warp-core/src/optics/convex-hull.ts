/**
 * The convex hull of a few points in 3-D, by the incremental method (de Berg et al., *Computational
 * Geometry*, 3rd ed., 2008, ch. 11): a first tetrahedron, then each point in turn removes the faces it
 * sees and joins the horizon. O(n²), meant for the boundary loops of a dome mesh (tens to a few hundred
 * points). Returns faces as index triples wound counter-clockwise seen from outside, or null when the
 * points are (within `eps`) coplanar or fewer than four.
 */
export function convexHull(points: ArrayLike<number>, eps: number): [number, number, number][] | null {
  const n = Math.floor(points.length / 3);
  if (n < 4) return null;
  const P = (i: number, a: number) => points[3 * i + a];
  const sub = (i: number, j: number): [number, number, number] => [P(i, 0) - P(j, 0), P(i, 1) - P(j, 1), P(i, 2) - P(j, 2)];
  const cross = (a: number[], b: number[]): [number, number, number] => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
  const dot = (a: number[], b: number[]) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
  // a first tetrahedron: two far points, the farthest from their line, the farthest from that plane
  let i0 = 0;
  let i1 = -1;
  let far = 0;
  for (let i = 1; i < n; i++) {
    const d = Math.hypot(...sub(i, i0));
    if (d > far) {
      far = d;
      i1 = i;
    }
  }
  if (i1 < 0 || far <= eps) return null;
  let i2 = -1;
  far = 0;
  const e = sub(i1, i0);
  for (let i = 0; i < n; i++) {
    const d = Math.hypot(...cross(e, sub(i, i0))) / Math.hypot(...e);
    if (d > far) {
      far = d;
      i2 = i;
    }
  }
  if (i2 < 0 || far <= eps) return null;
  let i3 = -1;
  far = 0;
  const nrm = cross(sub(i1, i0), sub(i2, i0));
  const nl = Math.hypot(...nrm);
  for (let i = 0; i < n; i++) {
    const d = Math.abs(dot(nrm, sub(i, i0))) / nl;
    if (d > far) {
      far = d;
      i3 = i;
    }
  }
  if (i3 < 0 || far <= eps) return null;
  const inside = [0, 1, 2].map((a) => (P(i0, a) + P(i1, a) + P(i2, a) + P(i3, a)) / 4);
  interface Face { v: [number, number, number]; n: [number, number, number]; d: number }
  const face = (a: number, b: number, c: number): Face => {
    let v: [number, number, number] = [a, b, c];
    let fn = cross(sub(b, a), sub(c, a));
    if (dot(fn, [inside[0] - P(a, 0), inside[1] - P(a, 1), inside[2] - P(a, 2)]) > 0) {
      v = [a, c, b];
      fn = [-fn[0], -fn[1], -fn[2]];
    }
    const l = Math.hypot(...fn);
    const un: [number, number, number] = [fn[0] / l, fn[1] / l, fn[2] / l];
    return { v, n: un, d: un[0] * P(a, 0) + un[1] * P(a, 1) + un[2] * P(a, 2) };
  };
  let faces: Face[] = [face(i0, i1, i2), face(i0, i1, i3), face(i0, i2, i3), face(i1, i2, i3)];
  for (let p = 0; p < n; p++) {
    if (p === i0 || p === i1 || p === i2 || p === i3) continue;
    const x = [P(p, 0), P(p, 1), P(p, 2)];
    const visible = faces.filter((f) => dot(f.n, x) - f.d > eps);
    if (visible.length === 0) continue;
    // horizon: edges of visible faces whose reverse is not on a visible face
    const edges = new Set<string>();
    for (const f of visible) for (let k = 0; k < 3; k++) edges.add(`${f.v[k]},${f.v[(k + 1) % 3]}`);
    const kept = faces.filter((f) => !visible.includes(f));
    for (const f of visible) {
      for (let k = 0; k < 3; k++) {
        const a = f.v[k];
        const b = f.v[(k + 1) % 3];
        if (!edges.has(`${b},${a}`)) kept.push(face(a, b, p));
      }
    }
    faces = kept;
  }
  return faces.map((f) => f.v);
}
