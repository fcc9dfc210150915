/**
 * The dome as built, given as triangles (DESIGN.md "As-built domes"): the reflected ray takes its first
 * triangle hit going forward; where it meets none the pixel is `open`.
 */
import type { ReadonlyVec3, Vec3 } from '../math.js';
import type { LengthUnit } from '../units.js';
import { TriangleBvh } from './triangle-bvh.js';

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
   * none (an opening). Rays start on the mirror, so a hit closer than a micrometre is the start itself.
   */
  firstHit(o: ReadonlyVec3, d: ReadonlyVec3): number {
    return this.bvh.firstHit(o[0], o[1], o[2], d[0], d[1], d[2], 1e-9);
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
