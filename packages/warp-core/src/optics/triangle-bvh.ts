/**
 * A bounding-volume hierarchy over triangles, for the first hit of a ray on an as-built dome.
 *
 * The design follows three-mesh-bvh (`src/core/build/`): binned surface-area-heuristic splits on the
 * triangles' centroids, nodes in flat typed arrays in depth-first order (the left child follows its
 * parent, the right child's index is stored), built once and traversed with a preallocated stack, so a
 * query allocates nothing. Triangles are stored in leaf order as (v0, e1 = v1 − v0, e2 = v2 − v0), the
 * form the Möller–Trumbore test wants (Möller & Trumbore, "Fast, minimum storage ray/triangle
 * intersection", 1997). Either face of a triangle counts.
 */

const MAX_LEAF = 4;
const BINS = 32;
/** A hair of barycentric slack so a ray through a shared edge cannot slip between two triangles. */
const EDGE = 1e-12;
/** SAH costs: one box test against one triangle test (common practice: about 1 : 1 in scalar code). */
const COST_NODE = 1;
const COST_TRIANGLE = 1;

/**
 * The ray/triangle test (Möller & Trumbore 1997) for ray o + t·d against the triangle stored at offset k
 * of `tri` as (v0, e1, e2): its t in (tMin, tMax), or −1 for a miss or a ray parallel to its plane.
 * Barycentrics (u, v) of a hit go to `uv`; `edge` is the slack allowed outside [0, 1]. Either face counts.
 */
export function rayTriangle(tri: Float64Array, k: number, ox: number, oy: number, oz: number, dx: number, dy: number, dz: number, tMin: number, tMax: number, edge: number, uv: Float64Array): number {
  const e1x = tri[k + 3], e1y = tri[k + 4], e1z = tri[k + 5];
  const e2x = tri[k + 6], e2y = tri[k + 7], e2z = tri[k + 8];
  const px = dy * e2z - dz * e2y;
  const py = dz * e2x - dx * e2z;
  const pz = dx * e2y - dy * e2x;
  const det = e1x * px + e1y * py + e1z * pz;
  if (det === 0) return -1;
  const inv = 1 / det;
  const sx = ox - tri[k], sy = oy - tri[k + 1], sz = oz - tri[k + 2];
  const u = (sx * px + sy * py + sz * pz) * inv;
  if (!(u >= -edge && u <= 1 + edge)) return -1;
  const qx = sy * e1z - sz * e1y;
  const qy = sz * e1x - sx * e1z;
  const qz = sx * e1y - sy * e1x;
  const v = (dx * qx + dy * qy + dz * qz) * inv;
  if (!(v >= -edge && u + v <= 1 + edge)) return -1;
  const t = (e2x * qx + e2y * qy + e2z * qz) * inv;
  if (!(t > tMin && t < tMax)) return -1;
  uv[0] = u;
  uv[1] = v;
  return t;
}

export class TriangleBvh {
  /** Per node: min x, y, z, max x, y, z. */
  readonly bounds: Float64Array;
  /** Per node: interior [right child, −1 − split axis]; leaf [first triangle, count ≥ 0]. */
  readonly data: Int32Array;
  /** Per triangle in leaf order: v0, e1, e2 (9 numbers). */
  readonly triangles: Float64Array;
  /** Leaf order → the triangle's index in the input. */
  readonly order: Uint32Array;
  readonly nodeCount: number;
  readonly depth: number;
  /** The input index of the triangle the last `firstHit` found (−1 for none), its leaf slot, and its barycentrics. */
  hitTriangle = -1;
  hitSlot = -1;
  hitU = 0;
  hitV = 0;
  private readonly stack: Int32Array;
  private readonly stackT: Float64Array;
  /** Leaf-order slot of the last hit (−1 before any): the next query tests it first. */
  private lastSlot = -1;
  /** See `convex`: undefined until first asked, null when not convex. */
  private planeSide: Int8Array | null | undefined;
  /** Edge neighbours per leaf slot, for convex meshes (see `edgeNeighbours`). */
  private neighbours: Int32Array | undefined;
  /** Barycentrics (u, v) of the last `slotHit`. */
  private readonly slotUv = new Float64Array(2);

  /**
   * Builds over the triangles (i0, i1, i2) = indices[3k..3k+2] of the xyz `positions`. Indices must be
   * in range (the file parsers check that).
   */
  constructor(positions: ArrayLike<number>, indices: ArrayLike<number>) {
    const n = Math.floor(indices.length / 3);
    const cen = new Float64Array(3 * n);
    const box = new Float64Array(6 * n);
    for (let k = 0; k < n; k++) {
      const a = 3 * indices[3 * k];
      const b = 3 * indices[3 * k + 1];
      const c = 3 * indices[3 * k + 2];
      for (let ax = 0; ax < 3; ax++) {
        const pa = positions[a + ax];
        const pb = positions[b + ax];
        const pc = positions[c + ax];
        const lo = Math.min(pa, pb, pc);
        const hi = Math.max(pa, pb, pc);
        box[6 * k + ax] = lo;
        box[6 * k + 3 + ax] = hi;
        cen[3 * k + ax] = 0.5 * (lo + hi);
      }
    }
    const ids = new Uint32Array(n);
    for (let k = 0; k < n; k++) ids[k] = k;
    const maxNodes = Math.max(1, 2 * n - 1);
    const bounds = new Float64Array(6 * maxNodes);
    const data = new Int32Array(2 * maxNodes);
    let count = 0;
    let deepest = 0;
    // scratch for the binned SAH
    const binBox = new Float64Array(6 * BINS);
    const binCount = new Uint32Array(BINS);
    const rightArea = new Float64Array(BINS);
    const rightCount = new Uint32Array(BINS);

    const area = (b: Float64Array, o: number): number => {
      const dx = b[o + 3] - b[o];
      const dy = b[o + 4] - b[o + 1];
      const dz = b[o + 5] - b[o + 2];
      return dx < 0 ? 0 : 2 * (dx * dy + dy * dz + dz * dx);
    };
    const emptyBox = (b: Float64Array, o: number) => {
      b[o] = b[o + 1] = b[o + 2] = Infinity;
      b[o + 3] = b[o + 4] = b[o + 5] = -Infinity;
    };
    const growBox = (b: Float64Array, o: number, t: number) => {
      for (let ax = 0; ax < 3; ax++) {
        if (box[6 * t + ax] < b[o + ax]) b[o + ax] = box[6 * t + ax];
        if (box[6 * t + 3 + ax] > b[o + 3 + ax]) b[o + 3 + ax] = box[6 * t + 3 + ax];
      }
    };

    const build = (start: number, end: number, level: number): number => {
      const node = count++;
      if (level > deepest) deepest = level;
      const o = 6 * node;
      emptyBox(bounds, o);
      let cmin0 = Infinity, cmin1 = Infinity, cmin2 = Infinity;
      let cmax0 = -Infinity, cmax1 = -Infinity, cmax2 = -Infinity;
      for (let i = start; i < end; i++) {
        const t = ids[i];
        growBox(bounds, o, t);
        const x = cen[3 * t], y = cen[3 * t + 1], z = cen[3 * t + 2];
        if (x < cmin0) cmin0 = x;
        if (x > cmax0) cmax0 = x;
        if (y < cmin1) cmin1 = y;
        if (y > cmax1) cmax1 = y;
        if (z < cmin2) cmin2 = z;
        if (z > cmax2) cmax2 = z;
      }
      const m = end - start;
      const leaf = () => {
        data[2 * node] = start;
        data[2 * node + 1] = m;
        return node;
      };
      if (m <= MAX_LEAF) return leaf();
      const parentArea = area(bounds, o);
      const cmin = [cmin0, cmin1, cmin2];
      const cmax = [cmax0, cmax1, cmax2];
      let bestCost = Infinity;
      let bestAxis = -1;
      let bestSplit = 0;
      for (let ax = 0; ax < 3; ax++) {
        const extent = cmax[ax] - cmin[ax];
        if (!(extent > 0)) continue;
        const scaleBin = BINS / extent;
        for (let b = 0; b < BINS; b++) {
          emptyBox(binBox, 6 * b);
          binCount[b] = 0;
        }
        for (let i = start; i < end; i++) {
          const t = ids[i];
          const b = Math.min(BINS - 1, Math.floor((cen[3 * t + ax] - cmin[ax]) * scaleBin));
          binCount[b]++;
          growBox(binBox, 6 * b, t);
        }
        // sweep from the right: area and count of bins b.. BINS−1
        let rx0 = Infinity, ry0 = Infinity, rz0 = Infinity, rx1 = -Infinity, ry1 = -Infinity, rz1 = -Infinity;
        let rc = 0;
        for (let b = BINS - 1; b > 0; b--) {
          const q = 6 * b;
          if (binCount[b] > 0) {
            rx0 = Math.min(rx0, binBox[q]); ry0 = Math.min(ry0, binBox[q + 1]); rz0 = Math.min(rz0, binBox[q + 2]);
            rx1 = Math.max(rx1, binBox[q + 3]); ry1 = Math.max(ry1, binBox[q + 4]); rz1 = Math.max(rz1, binBox[q + 5]);
          }
          rc += binCount[b];
          const dx = rx1 - rx0, dy = ry1 - ry0, dz = rz1 - rz0;
          rightArea[b] = rc > 0 ? 2 * (dx * dy + dy * dz + dz * dx) : 0;
          rightCount[b] = rc;
        }
        let lx0 = Infinity, ly0 = Infinity, lz0 = Infinity, lx1 = -Infinity, ly1 = -Infinity, lz1 = -Infinity;
        let lc = 0;
        for (let b = 0; b < BINS - 1; b++) {
          const q = 6 * b;
          if (binCount[b] > 0) {
            lx0 = Math.min(lx0, binBox[q]); ly0 = Math.min(ly0, binBox[q + 1]); lz0 = Math.min(lz0, binBox[q + 2]);
            lx1 = Math.max(lx1, binBox[q + 3]); ly1 = Math.max(ly1, binBox[q + 4]); lz1 = Math.max(lz1, binBox[q + 5]);
          }
          lc += binCount[b];
          if (lc === 0 || rightCount[b + 1] === 0) continue;
          const dx = lx1 - lx0, dy = ly1 - ly0, dz = lz1 - lz0;
          const la = 2 * (dx * dy + dy * dz + dz * dx);
          const cost = COST_NODE + (COST_TRIANGLE * (la * lc + rightArea[b + 1] * rightCount[b + 1])) / (parentArea > 0 ? parentArea : 1);
          if (cost < bestCost) {
            bestCost = cost;
            bestAxis = ax;
            bestSplit = cmin[ax] + ((b + 1) * extent) / BINS;
          }
        }
      }
      if (bestAxis < 0) {
        // every centroid at one point: a leaf, or a middle split when too many for one
        if (m <= 64) return leaf();
        return splitAt(node, start, end, start + (m >> 1), 0, level);
      }
      // partition ids[start, end) by centroid < bestSplit
      let i = start;
      let j = end - 1;
      while (i <= j) {
        if (cen[3 * ids[i] + bestAxis] < bestSplit) i++;
        else {
          const t = ids[i];
          ids[i] = ids[j];
          ids[j] = t;
          j--;
        }
      }
      let mid = i;
      if (mid === start || mid === end) mid = start + (m >> 1);
      return splitAt(node, start, end, mid, bestAxis, level);
    };
    const splitAt = (node: number, start: number, end: number, mid: number, axis: number, level: number): number => {
      build(start, mid, level + 1);
      const right = build(mid, end, level + 1);
      data[2 * node] = right;
      data[2 * node + 1] = -1 - axis;
      return node;
    };

    if (n > 0) build(0, n, 0);
    else {
      emptyBox(bounds, 0);
      data[0] = 0;
      data[1] = 0;
      count = 1;
    }
    this.nodeCount = count;
    this.depth = deepest;
    this.bounds = bounds.slice(0, 6 * count);
    this.data = data.slice(0, 2 * count);
    this.order = ids;
    const tri = new Float64Array(9 * n);
    for (let s = 0; s < n; s++) {
      const k = ids[s];
      const a = 3 * indices[3 * k];
      const b = 3 * indices[3 * k + 1];
      const c = 3 * indices[3 * k + 2];
      for (let ax = 0; ax < 3; ax++) {
        tri[9 * s + ax] = positions[a + ax];
        tri[9 * s + 3 + ax] = positions[b + ax] - positions[a + ax];
        tri[9 * s + 6 + ax] = positions[c + ax] - positions[a + ax];
      }
    }
    this.triangles = tri;
    this.stack = new Int32Array(Math.max(64, 2 * deepest + 4));
    this.stackT = new Float64Array(this.stack.length);
  }

  /**
   * Distance t along o + t·d to the nearest triangle with tMin < t < tMax, or −1 when there is none;
   * d need not be unit length (t is in units of |d|). Sets `hitTriangle`, `hitU`, `hitV`. Allocates nothing.
   *
   * Neighbouring rays (the pixels of a row) mostly meet the same triangle, so the last hit's triangle is
   * tested first: its distance bounds the search from the start and most boxes are never entered. Both
   * children's boxes are tested at their parent; the nearer is entered, the farther kept with its entry
   * distance and dropped unopened once a nearer hit is known. The answer does not depend on the hint.
   *
   * `anyHit`: return the first hit found. Only for rays from a point strictly inside a convex mesh
   * (`convex` and `containsBall`), where a ray meets the surface once and any hit is the first.
   */
  firstHit(ox: number, oy: number, oz: number, dx: number, dy: number, dz: number, tMin = 0, tMax = Infinity, anyHit = false): number {
    const bounds = this.bounds;
    const data = this.data;
    const tri = this.triangles;
    const stack = this.stack;
    const stackT = this.stackT;
    const uv = this.slotUv;
    let best = tMax;
    let hit = -1;
    let hu = 0;
    let hv = 0;
    // the hint: the triangle the previous query hit (and, from inside a convex mesh, its neighbours)
    const hint = this.lastSlot;
    if (hint >= 0) {
      const t = this.slotHit(hint, ox, oy, oz, dx, dy, dz, tMin, best);
      if (t >= 0) {
        best = t;
        hit = hint;
        hu = this.slotUv[0];
        hv = this.slotUv[1];
        if (anyHit) return this.finish(hit, hu, hv, best);
      } else if (anyHit && this.neighbours !== undefined) {
        const nb = this.neighbours;
        for (let e = 3 * hint; e < 3 * hint + 3; e++) {
          const s = nb[e];
          if (s < 0) continue;
          const t2 = this.slotHit(s, ox, oy, oz, dx, dy, dz, tMin, best);
          if (t2 >= 0) return this.finish(s, this.slotUv[0], this.slotUv[1], t2);
        }
      }
    }
    const ix = 1 / dx;
    const iy = 1 / dy;
    const iz = 1 / dz;
    // offsets of the near and far slab of each axis
    const nx = ix >= 0 ? 0 : 3;
    const ny = iy >= 0 ? 1 : 4;
    const nz = iz >= 0 ? 2 : 5;
    const fx = 3 - nx;
    const fy = 5 - ny;
    const fz = 7 - nz;
    // the root's box; NaN from 0·∞ (a ray parallel to a slab, starting on its plane) fails every comparison
    // and so never narrows an interval — except as the first value, which the x axis replaces by no bound
    {
      let tn = (bounds[nx] - ox) * ix;
      let tf = (bounds[fx] - ox) * ix;
      if (tn !== tn) tn = -Infinity;
      if (tf !== tf) tf = Infinity;
      const tyn = (bounds[ny] - oy) * iy;
      const tyf = (bounds[fy] - oy) * iy;
      if (tyn > tn) tn = tyn;
      if (tyf < tf) tf = tyf;
      const tzn = (bounds[nz] - oz) * iz;
      const tzf = (bounds[fz] - oz) * iz;
      if (tzn > tn) tn = tzn;
      if (tzf < tf) tf = tzf;
      if (!(tn <= tf && tf >= tMin && tn <= best)) return this.finish(hit, hu, hv, best);
    }
    let node = 0;
    let sp = 0;
    for (;;) {
      const w = data[2 * node + 1];
      if (w > 0) {
        // a leaf of w triangles
        const first = data[2 * node];
        const end = first + w;
        for (let s = first; s < end; s++) {
          if (s === hint) continue;
          const t = rayTriangle(tri, 9 * s, ox, oy, oz, dx, dy, dz, tMin, best, EDGE, uv);
          if (t >= 0) {
            best = t;
            hit = s;
            hu = uv[0];
            hv = uv[1];
          }
        }
        if (anyHit && hit >= 0) break;
      } else if (w < 0) {
        // an interior node: test both children's boxes, enter the nearer, keep the farther
        const a = node + 1;
        const b = data[2 * node];
        let oa = 6 * a;
        let tnA = (bounds[oa + nx] - ox) * ix;
        let tfA = (bounds[oa + fx] - ox) * ix;
        if (tnA !== tnA) tnA = -Infinity;
        if (tfA !== tfA) tfA = Infinity;
        let tn = (bounds[oa + ny] - oy) * iy;
        let tf = (bounds[oa + fy] - oy) * iy;
        if (tn > tnA) tnA = tn;
        if (tf < tfA) tfA = tf;
        tn = (bounds[oa + nz] - oz) * iz;
        tf = (bounds[oa + fz] - oz) * iz;
        if (tn > tnA) tnA = tn;
        if (tf < tfA) tfA = tf;
        const hitA = tnA <= tfA && tfA >= tMin && tnA <= best;
        oa = 6 * b;
        let tnB = (bounds[oa + nx] - ox) * ix;
        let tfB = (bounds[oa + fx] - ox) * ix;
        if (tnB !== tnB) tnB = -Infinity;
        if (tfB !== tfB) tfB = Infinity;
        tn = (bounds[oa + ny] - oy) * iy;
        tf = (bounds[oa + fy] - oy) * iy;
        if (tn > tnB) tnB = tn;
        if (tf < tfB) tfB = tf;
        tn = (bounds[oa + nz] - oz) * iz;
        tf = (bounds[oa + fz] - oz) * iz;
        if (tn > tnB) tnB = tn;
        if (tf < tfB) tfB = tf;
        const hitB = tnB <= tfB && tfB >= tMin && tnB <= best;
        if (hitA && hitB) {
          if (tnA <= tnB) {
            stack[sp] = b;
            stackT[sp++] = tnB;
            node = a;
          } else {
            stack[sp] = a;
            stackT[sp++] = tnA;
            node = b;
          }
          continue;
        }
        if (hitA) {
          node = a;
          continue;
        }
        if (hitB) {
          node = b;
          continue;
        }
      }
      // next kept box that a nearer hit has not ruled out
      while (sp > 0 && stackT[sp - 1] > best) sp--;
      if (sp === 0) break;
      node = stack[--sp];
    }
    return this.finish(hit, hu, hv, best);
  }

  /**
   * Whether the triangles bound a convex region: every vertex on one side of every triangle's plane
   * (within 1e-9 of the mesh's size). Then a ray from a point strictly inside all the planes' inner
   * sides leaves that region once, and any triangle it meets is the one it meets first. Computed on
   * first use (a box-pruned search per plane); meshes above 500,000 triangles are not checked.
   */
  get convex(): boolean {
    if (this.planeSide === undefined) this.planeSide = this.sides();
    return this.planeSide !== null;
  }

  /**
   * True when the ball (centre, radius) lies strictly inside every triangle's plane, on the side of the
   * mesh's other vertices, and the mesh is `convex`: rays starting in the ball may use `anyHit`.
   */
  containsBall(cx: number, cy: number, cz: number, radius: number): boolean {
    if (!this.convex) return false;
    const side = this.planeSide!;
    const tri = this.triangles;
    const tol = this.tolerance;
    for (let s = 0; s < side.length; s++) {
      const k = 9 * s;
      const [nx, ny, nz] = planeNormal(tri, k);
      const d = nx * (cx - tri[k]) + ny * (cy - tri[k + 1]) + nz * (cz - tri[k + 2]);
      if (Math.abs(d) <= radius + tol) return false;
      if (side[s] !== 0 && Math.sign(d) !== side[s]) return false;
    }
    return true;
  }

  /** 1e-9 of the bounding box's diagonal. */
  private get tolerance(): number {
    const b = this.bounds;
    const diag = Math.hypot(b[3] - b[0], b[4] - b[1], b[5] - b[2]);
    return 1e-9 * (Number.isFinite(diag) ? diag : 0);
  }

  /** Per triangle the side (+1, −1, or 0 when every vertex is on its plane) of the other vertices; null when some plane has vertices on both sides. */
  private sides(): Int8Array | null {
    const n = this.order.length;
    if (n > 500_000) return null;
    const tri = this.triangles;
    const tol = this.tolerance;
    const out = new Int8Array(n);
    for (let s = 0; s < n; s++) {
      const k = 9 * s;
      const [nx, ny, nz] = planeNormal(tri, k);
      const d0 = nx * tri[k] + ny * tri[k + 1] + nz * tri[k + 2];
      const pos = this.anyVertexBeyond(nx, ny, nz, d0 + tol);
      const neg = this.anyVertexBeyond(-nx, -ny, -nz, -d0 + tol);
      if (pos && neg) return null;
      out[s] = pos ? 1 : neg ? -1 : 0;
    }
    this.neighbours = this.edgeNeighbours();
    return out;
  }

  /** Whether some triangle corner p has n·p > level (boxes wholly at or below it are skipped). */
  private anyVertexBeyond(nx: number, ny: number, nz: number, level: number): boolean {
    const b = this.bounds;
    const data = this.data;
    const tri = this.triangles;
    const stack = this.stack;
    let sp = 0;
    stack[sp++] = 0;
    while (sp > 0) {
      const node = stack[--sp];
      const o = 6 * node;
      const top = nx * (nx > 0 ? b[o + 3] : b[o]) + ny * (ny > 0 ? b[o + 4] : b[o + 1]) + nz * (nz > 0 ? b[o + 5] : b[o + 2]);
      if (!(top > level)) continue;
      const w = data[2 * node + 1];
      if (w >= 0) {
        const first = data[2 * node];
        for (let s = first; s < first + w; s++) {
          const k = 9 * s;
          const x = tri[k], y = tri[k + 1], z = tri[k + 2];
          if (nx * x + ny * y + nz * z > level) return true;
          if (nx * (x + tri[k + 3]) + ny * (y + tri[k + 4]) + nz * (z + tri[k + 5]) > level) return true;
          if (nx * (x + tri[k + 6]) + ny * (y + tri[k + 7]) + nz * (z + tri[k + 8]) > level) return true;
        }
      } else {
        stack[sp++] = node + 1;
        stack[sp++] = data[2 * node];
      }
    }
    return false;
  }

  /** The ray/triangle test on the triangle in leaf slot s: its t in (tMin, tMax), or −1; barycentrics in slotUv. */
  private slotHit(s: number, ox: number, oy: number, oz: number, dx: number, dy: number, dz: number, tMin: number, tMax: number): number {
    return rayTriangle(this.triangles, 9 * s, ox, oy, oz, dx, dy, dz, tMin, tMax, EDGE, this.slotUv);
  }

  /** Per leaf slot, the slots across its three edges (−1 where none): triangles sharing two corners. */
  private edgeNeighbours(): Int32Array {
    const n = this.order.length;
    const tri = this.triangles;
    const ids = new Map<string, number>();
    const corner = new Int32Array(3 * n);
    for (let s = 0; s < n; s++) {
      const k = 9 * s;
      for (let c = 0; c < 3; c++) {
        const x = tri[k] + (c === 1 ? tri[k + 3] : c === 2 ? tri[k + 6] : 0);
        const y = tri[k + 1] + (c === 1 ? tri[k + 4] : c === 2 ? tri[k + 7] : 0);
        const z = tri[k + 2] + (c === 1 ? tri[k + 5] : c === 2 ? tri[k + 8] : 0);
        const key = `${x},${y},${z}`;
        let id = ids.get(key);
        if (id === undefined) ids.set(key, (id = ids.size));
        corner[3 * s + c] = id;
      }
    }
    const nv = ids.size;
    const firstUse = new Map<number, number>();
    const out = new Int32Array(3 * n).fill(-1);
    for (let s = 0; s < n; s++) {
      for (let e = 0; e < 3; e++) {
        const a = corner[3 * s + e];
        const b = corner[3 * s + ((e + 1) % 3)];
        const key = a < b ? a * nv + b : b * nv + a;
        const other = firstUse.get(key);
        if (other === undefined) firstUse.set(key, 3 * s + e);
        else {
          out[3 * s + e] = Math.floor(other / 3);
          out[other] = s;
        }
      }
    }
    return out;
  }

  private finish(hit: number, hu: number, hv: number, best: number): number {
    if (hit >= 0) this.lastSlot = hit;
    this.hitSlot = hit;
    this.hitTriangle = hit < 0 ? -1 : this.order[hit];
    this.hitU = hu;
    this.hitV = hv;
    return hit < 0 ? -1 : best;
  }
}

/** Unit normal (e1 × e2) of the triangle stored at offset k; zero for a degenerate triangle. */
function planeNormal(tri: Float64Array, k: number): [number, number, number] {
  const e1x = tri[k + 3], e1y = tri[k + 4], e1z = tri[k + 5];
  const e2x = tri[k + 6], e2y = tri[k + 7], e2z = tri[k + 8];
  const x = e1y * e2z - e1z * e2y;
  const y = e1z * e2x - e1x * e2z;
  const z = e1x * e2y - e1y * e2x;
  const l = Math.hypot(x, y, z);
  return l > 0 ? [x / l, y / l, z / l] : [0, 0, 0];
}
