/**
 * The dome as built, given as triangles (DESIGN.md "As-built domes"): the reflected ray takes its first
 * triangle hit going forward; where it meets none the pixel is `open`.
 */
import type { ReadonlyVec3, Vec3 } from '../math.js';
import type { LengthUnit } from '../units.js';
import { TriangleBvh } from './triangle-bvh.js';
import { convexHull } from './convex-hull.js';

/** More triangles than this is not a dome anyone measured (and would take minutes to read). */
export const MAX_DOME_TRIANGLES = 2_000_000;

/** Where a mesh came from, as the rig file names it (kept so the rig can be written back). */
export interface DomeMeshSource {
  /** The path as written in the rig file, relative to the rig file's folder. */
  file: string;
  /** `dome.meshUnits` when the rig gave it. */
  units?: LengthUnit;
}

/** Triangles as read from a file: xyz per vertex, three vertex indices per triangle. */
export interface TriangleSoup {
  positions: Float64Array;
  indices: Uint32Array;
}

export class DomeMesh {
  readonly bvh: TriangleBvh;
  readonly triangleCount: number;
  /** Bounding box of the vertices, metres. */
  readonly min: Vec3;
  readonly max: Vec3;

  /** `positions` in metres, world frame; indices in range (the file parsers check both). */
  constructor(readonly positions: Float64Array, readonly indices: Uint32Array, readonly source?: DomeMeshSource) {
    this.triangleCount = Math.floor(indices.length / 3);
    this.bvh = new TriangleBvh(positions, indices);
    const min: Vec3 = [Infinity, Infinity, Infinity];
    const max: Vec3 = [-Infinity, -Infinity, -Infinity];
    for (let i = 0; i < positions.length; i += 3) {
      for (let a = 0; a < 3; a++) {
        if (positions[i + a] < min[a]) min[a] = positions[i + a];
        if (positions[i + a] > max[a]) max[a] = positions[i + a];
      }
    }
    this.min = min;
    this.max = max;
  }

  /**
   * Distance along o + t·d (d unit length) to the first triangle going forward, or −1 when the ray meets
   * none (an opening). Rays start on the mirror, so a hit closer than a nanometre is the start itself.
   * `fromInside`: o is known to lie strictly inside a convex mesh (`encloses`), so any hit is the first.
   */
  firstHit(o: ReadonlyVec3, d: ReadonlyVec3, fromInside = false): number {
    return this.bvh.firstHit(o[0], o[1], o[2], d[0], d[1], d[2], 1e-9, Infinity, fromInside);
  }

  /**
   * The mesh with its openings closed by portals — a fan of triangles from each boundary loop's centroid
   * — when the whole is convex (TriangleBvh.convex), else null. Triangles at index `triangleCount` and up
   * are portals: a ray from inside that meets one leaves through an opening. Every ray from inside a
   * closed convex mesh meets exactly one triangle, so the hint of the last hit almost always answers.
   */
  closedConvex(): TriangleBvh | null {
    if (this.closed === undefined) this.closed = this.buildClosed();
    return this.closed;
  }
  private closed: TriangleBvh | null | undefined;

  private buildClosed(): TriangleBvh | null {
    if (!this.bvh.convex) return null;
    const n = this.triangleCount;
    const ix = this.indices;
    // boundary edges: used by one triangle, kept in the direction that triangle runs them
    const use = new Map<number, number>();
    const nv = this.positions.length / 3;
    for (let t = 0; t < 3 * n; t += 3) {
      for (let e = 0; e < 3; e++) {
        const a = ix[t + e], b = ix[t + ((e + 1) % 3)];
        const key = a < b ? a * nv + b : b * nv + a;
        use.set(key, (use.get(key) ?? 0) + 1);
      }
    }
    // boundary vertices and their two boundary neighbours (orientation of the triangles not assumed)
    const links = new Map<number, number[]>();
    for (let t = 0; t < 3 * n; t += 3) {
      for (let e = 0; e < 3; e++) {
        const a = ix[t + e], b = ix[t + ((e + 1) % 3)];
        if (use.get(a < b ? a * nv + b : b * nv + a) !== 1) continue;
        for (const [p, q] of [[a, b], [b, a]]) {
          const l = links.get(p);
          if (l === undefined) links.set(p, [q]);
          else l.push(q);
        }
      }
    }
    if (links.size === 0) return this.bvh;
    for (const l of links.values()) if (l.length !== 2) return null; // a boundary that touches itself: leave it open
    const loops: number[][] = [];
    const seen = new Set<number>();
    for (const start of links.keys()) {
      if (seen.has(start)) continue;
      const loop: number[] = [start];
      seen.add(start);
      let prev = start;
      let v = links.get(start)![0];
      while (v !== start) {
        if (seen.has(v)) return null;
        seen.add(v);
        loop.push(v);
        const [p, q] = links.get(v)!;
        const w = p === prev ? q : p;
        prev = v;
        v = w;
      }
      if (loop.length < 3) return null;
      loops.push(loop);
    }
    // first a fan from each loop's centroid (a flat base ring); failing that, the faces of each loop's
    // convex hull that look away from the mesh (a ragged ring, as an odd frequency's cut leaves)
    return this.withPortals(loops, 'fan') ?? this.withPortals(loops, 'hull');
  }

  private withPortals(loops: number[][], how: 'fan' | 'hull'): TriangleBvh | null {
    const p0 = this.positions;
    const pos = Array.from(p0);
    const tri = Array.from(this.indices);
    const nv = p0.length / 3;
    let mx = 0, my = 0, mz = 0;
    for (let i = 0; i < p0.length; i += 3) {
      mx += p0[i];
      my += p0[i + 1];
      mz += p0[i + 2];
    }
    mx /= nv;
    my /= nv;
    mz /= nv;
    const size = Math.hypot(this.max[0] - this.min[0], this.max[1] - this.min[1], this.max[2] - this.min[2]);
    for (const loop of loops) {
      if (how === 'fan') {
        let cx = 0, cy = 0, cz = 0;
        for (const v of loop) {
          cx += pos[3 * v];
          cy += pos[3 * v + 1];
          cz += pos[3 * v + 2];
        }
        const c = pos.length / 3;
        pos.push(cx / loop.length, cy / loop.length, cz / loop.length);
        for (let i = 0; i < loop.length; i++) tri.push(c, loop[(i + 1) % loop.length], loop[i]);
        continue;
      }
      const pts: number[] = [];
      for (const v of loop) pts.push(p0[3 * v], p0[3 * v + 1], p0[3 * v + 2]);
      const hull = convexHull(pts, 1e-9 * size);
      if (hull === null) return null;
      for (const [a, b, c] of hull) {
        const A = 3 * loop[a], B = 3 * loop[b], C = 3 * loop[c];
        const ux = p0[B] - p0[A], uy = p0[B + 1] - p0[A + 1], uz = p0[B + 2] - p0[A + 2];
        const wx = p0[C] - p0[A], wy = p0[C + 1] - p0[A + 1], wz = p0[C + 2] - p0[A + 2];
        const nx = uy * wz - uz * wy, ny = uz * wx - ux * wz, nz = ux * wy - uy * wx;
        const fx = (p0[A] + p0[B] + p0[C]) / 3 - mx, fy = (p0[A + 1] + p0[B + 1] + p0[C + 1]) / 3 - my, fz = (p0[A + 2] + p0[B + 2] + p0[C + 2]) / 3 - mz;
        if (nx * fx + ny * fy + nz * fz > 0) tri.push(loop[a], loop[b], loop[c]);
      }
    }
    const closed = new TriangleBvh(Float64Array.from(pos), Uint32Array.from(tri));
    return closed.convex ? closed : null;
  }

  /**
   * True when the mesh bounds a convex region and the ball (centre, radius in metres) lies strictly
   * inside it: every ray from the ball meets the surface at most once (see TriangleBvh.convex).
   */
  encloses(center: ReadonlyVec3, radius: number): boolean {
    return this.bvh.containsBall(center[0], center[1], center[2], radius);
  }
}

/**
 * How far the mesh sits from the dome centre, as a size to hold against `dome.radius`: the median
 * distance of the vertices at or above the springline (all of them when none are).
 */
export function meshNominalRadius(mesh: DomeMesh): number {
  const p = mesh.positions;
  const above: number[] = [];
  const all: number[] = [];
  for (let i = 0; i < p.length; i += 3) {
    const r = Math.hypot(p[i], p[i + 1], p[i + 2]);
    all.push(r);
    if (p[i + 2] >= 0) above.push(r);
  }
  const xs = (above.length > 0 ? above : all).sort((a, b) => a - b);
  return xs.length === 0 ? 0 : xs[Math.floor(xs.length / 2)];
}

/**
 * Upward directions from a point that meet no triangle, out of `count` spread evenly (a Fibonacci
 * spiral over the hemisphere above 10° altitude): a dome encloses what it covers, so any is a gap or a
 * mesh in the wrong place.
 */
export function openUpwardRays(mesh: DomeMesh, from: ReadonlyVec3, count = 200): number {
  let open = 0;
  const golden = Math.PI * (3 - Math.sqrt(5));
  const zMin = Math.sin((10 * Math.PI) / 180);
  for (let i = 0; i < count; i++) {
    const z = zMin + ((1 - zMin) * (i + 0.5)) / count;
    const h = Math.sqrt(1 - z * z);
    const a = i * golden;
    if (mesh.firstHit(from, [h * Math.cos(a), h * Math.sin(a), z]) < 0) open++;
  }
  return open;
}
