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

/** Leaf flag in a node's second word; the low bits hold the leaf's triangle count. */
const LEAF = 0x80000000;
const MAX_LEAF = 4;
const BINS = 32;
/** A hair of barycentric slack so a ray through a shared edge cannot slip between two triangles. */
const EDGE = 1e-12;
/** SAH costs: one box test against one triangle test (common practice: about 1 : 1 in scalar code). */
const COST_NODE = 1;
const COST_TRIANGLE = 1;

export class TriangleBvh {
  /** Per node: min x, y, z, max x, y, z. */
  readonly bounds: Float64Array;
  /** Per node: interior [right child, split axis]; leaf [first triangle, LEAF | count]. */
  readonly data: Uint32Array;
  /** Per triangle in leaf order: v0, e1, e2 (9 numbers). */
  readonly triangles: Float64Array;
  /** Leaf order → the triangle's index in the input. */
  readonly order: Uint32Array;
  readonly nodeCount: number;
  readonly depth: number;
  /** The input index of the triangle the last `firstHit` found (−1 for none), and its barycentrics. */
  hitTriangle = -1;
  hitU = 0;
  hitV = 0;
  private readonly stack: Uint32Array;

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
    const data = new Uint32Array(2 * maxNodes);
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
        data[2 * node + 1] = (LEAF | m) >>> 0;
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
      data[2 * node + 1] = axis;
      return node;
    };

    if (n > 0) build(0, n, 0);
    else {
      emptyBox(bounds, 0);
      data[0] = 0;
      data[1] = LEAF >>> 0;
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
    this.stack = new Uint32Array(Math.max(64, 2 * deepest + 4));
  }

  /**
   * Distance t along o + t·d to the nearest triangle with tMin < t < tMax, or −1 when there is none;
   * d need not be unit length (t is in units of |d|). Sets `hitTriangle`, `hitU`, `hitV`. Allocates nothing.
   */
  firstHit(ox: number, oy: number, oz: number, dx: number, dy: number, dz: number, tMin = 0, tMax = Infinity): number {
    const bounds = this.bounds;
    const data = this.data;
    const tri = this.triangles;
    const stack = this.stack;
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
    let best = tMax;
    let hit = -1;
    let hu = 0;
    let hv = 0;
    let sp = 0;
    stack[sp++] = 0;
    while (sp > 0) {
      const node = stack[--sp];
      const o = 6 * node;
      // slab test; a NaN from 0·∞ fails every comparison and so never narrows the interval
      let tn = (bounds[o + nx] - ox) * ix;
      let tf = (bounds[o + fx] - ox) * ix;
      const tyn = (bounds[o + ny] - oy) * iy;
      const tyf = (bounds[o + fy] - oy) * iy;
      if (tyn > tn) tn = tyn;
      if (tyf < tf) tf = tyf;
      const tzn = (bounds[o + nz] - oz) * iz;
      const tzf = (bounds[o + fz] - oz) * iz;
      if (tzn > tn) tn = tzn;
      if (tzf < tf) tf = tzf;
      if (tn > tf || tf < tMin || tn > best) continue;
      const w = data[2 * node + 1];
      if (w & LEAF) {
        const first = data[2 * node];
        const end = first + (w & 0x7fffffff);
        for (let s = first; s < end; s++) {
          const k = 9 * s;
          const e1x = tri[k + 3], e1y = tri[k + 4], e1z = tri[k + 5];
          const e2x = tri[k + 6], e2y = tri[k + 7], e2z = tri[k + 8];
          const px = dy * e2z - dz * e2y;
          const py = dz * e2x - dx * e2z;
          const pz = dx * e2y - dy * e2x;
          const det = e1x * px + e1y * py + e1z * pz;
          if (det === 0) continue; // the ray is parallel to the triangle's plane
          const inv = 1 / det;
          const sx = ox - tri[k], sy = oy - tri[k + 1], sz = oz - tri[k + 2];
          const u = (sx * px + sy * py + sz * pz) * inv;
          if (u < -EDGE || u > 1 + EDGE) continue;
          const qx = sy * e1z - sz * e1y;
          const qy = sz * e1x - sx * e1z;
          const qz = sx * e1y - sy * e1x;
          const v = (dx * qx + dy * qy + dz * qz) * inv;
          if (v < -EDGE || u + v > 1 + EDGE) continue;
          const t = (e2x * qx + e2y * qy + e2z * qz) * inv;
          if (t > tMin && t < best) {
            best = t;
            hit = s;
            hu = u;
            hv = v;
          }
        }
      } else {
        // nearer child on top of the stack
        const right = data[2 * node];
        const axis = w;
        const forward = axis === 0 ? dx >= 0 : axis === 1 ? dy >= 0 : dz >= 0;
        if (forward) {
          stack[sp++] = right;
          stack[sp++] = node + 1;
        } else {
          stack[sp++] = node + 1;
          stack[sp++] = right;
        }
      }
    }
    this.hitTriangle = hit < 0 ? -1 : this.order[hit];
    this.hitU = hu;
    this.hitV = hv;
    return hit < 0 ? -1 : best;
  }
}
