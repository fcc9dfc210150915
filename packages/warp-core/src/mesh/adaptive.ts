/**
 * The adaptive warp mesh for glTF and OBJ (issue 11): a restricted quadtree over the projector frame.
 *
 * A fine lattice (the smallest cell) is traced once, with the same fields as the uniform mesh
 * (buildMesh: u, v, brightness, the mask ramp at the exact edge). Root cells of 2^DEPTH lattice steps
 * split where the two triangles drawn from a cell's corners put content farther than the tolerance
 * from the trace at any lattice point inside it (in projector pixels, through the local Jacobian as
 * measureAccuracy does), and everywhere the edge of the lit area crosses, down to the smallest cell.
 * Then 2:1 balance (no leaf beside one less than half its size) and crack-free triangles: a leaf with
 * no smaller neighbour is the uniform mesh's two triangles; one with a smaller neighbour is a fan about
 * its centre through its corners and the midpoints its smaller neighbours share.
 */
import { allocGridOutput, landsOnDome } from '../trace.js';
import { buildMesh, type BakeOptions, type BakeResult } from './bake.js';
import { litTest } from './edge.js';
import type { Rig } from '../rig/model.js';
import { Tracer } from '../trace.js';
import type { LitTest } from './edge.js';
import { contentVisible, quantile, referenceArea } from './grid-samples.js';
import type { WarpMesh } from './mesh.js';

/** A warp mesh of triangles over the projector frame: what .glb and .obj can carry besides a grid. */
export interface TriangleWarpMesh {
  /** Projector resolution, pixels. */
  width: number;
  height: number;
  /** Vertex positions in projector pixels (x right, y down). */
  x: Float32Array;
  y: Float32Array;
  /** As WarpMesh: fisheye (u, v), brightness factor, mask per vertex. */
  u: Float32Array;
  v: Float32Array;
  brightness: Float32Array;
  mask: Float32Array;
  /** Three vertex indices per triangle, counter-clockwise seen from +z with y up (as the grid's). */
  indices: Uint32Array;
  meta: Record<string, unknown>;
}

/** Levels below a root cell: roots are 64 smallest cells a side. */
const DEPTH = 6;
/** The largest cells the edge of the lit area may cross, in smallest cells a side: the mask's ramp spans their diagonal. */
const EDGE_CELLS = 4;

export interface AdaptiveOptions {
  /** Side of the smallest cell, projector pixels (the lattice spacing is at most this). */
  smallestCell: number;
}

export const ADAPTIVE_DEFAULTS: Readonly<AdaptiveOptions> = { smallestCell: 1 };

/** The uniform grid as triangles, the same two per cell a GPU draws from the grid .glb. */
export function gridAsTriangles(mesh: WarpMesh): TriangleWarpMesh {
  const { cols, rows, width, height } = mesh;
  const x = new Float32Array(cols * rows);
  const y = new Float32Array(cols * rows);
  for (let r = 0; r < rows; r++)
    for (let c = 0; c < cols; c++) {
      x[r * cols + c] = (c * width) / (cols - 1);
      y[r * cols + c] = (r * height) / (rows - 1);
    }
  const indices = new Uint32Array((cols - 1) * (rows - 1) * 6);
  let t = 0;
  for (let r = 0; r + 1 < rows; r++)
    for (let c = 0; c + 1 < cols; c++) {
      const tl = r * cols + c;
      indices.set([tl, tl + cols, tl + cols + 1, tl, tl + cols + 1, tl + 1], t);
      t += 6;
    }
  return { width, height, x, y, u: mesh.u, v: mesh.v, brightness: mesh.brightness, mask: mesh.mask, indices, meta: mesh.meta };
}

/**
 * Inverse of A = N·∂(u, v)/∂(x, y) at every lattice point (4 values, row-major), from central
 * differences of the lattice (one-sided beside a point outside the edge); NaN where it has none.
 */
function inverseJacobians(f: WarpMesh, N: number): Float32Array {
  const { cols, rows } = f;
  const hx = f.width / (cols - 1);
  const hy = f.height / (rows - 1);
  const out = new Float32Array(4 * cols * rows).fill(Number.NaN);
  const lit = (k: number) => f.mask[k] >= 0.5;
  const d = (k: number, m: number, p: number, ok: [boolean, boolean], h: number, arr: Float32Array): number =>
    ok[0] && ok[1] ? (arr[p] - arr[m]) / (2 * h) : ok[1] ? (arr[p] - arr[k]) / h : ok[0] ? (arr[k] - arr[m]) / h : Number.NaN;
  for (let r = 0; r < rows; r++)
    for (let c = 0; c < cols; c++) {
      const k = r * cols + c;
      if (!lit(k)) continue;
      const ox: [boolean, boolean] = [c > 0 && lit(k - 1), c + 1 < cols && lit(k + 1)];
      const oy: [boolean, boolean] = [r > 0 && lit(k - cols), r + 1 < rows && lit(k + cols)];
      const a11 = N * d(k, k - 1, k + 1, ox, hx, f.u);
      const a21 = N * d(k, k - 1, k + 1, ox, hx, f.v);
      const a12 = N * d(k, k - cols, k + cols, oy, hy, f.u);
      const a22 = N * d(k, k - cols, k + cols, oy, hy, f.v);
      const det = a11 * a22 - a12 * a21;
      if (!(Math.abs(det) > 1e-12)) continue;
      out[4 * k] = a22 / det;
      out[4 * k + 1] = -a12 / det;
      out[4 * k + 2] = -a21 / det;
      out[4 * k + 3] = a11 / det;
    }
  return out;
}

/** The lattice a smallest cell of `s` pixels gives: root cells of 2^DEPTH steps covering the frame. */
export function adaptiveLattice(W: number, H: number, s: number): { cols: number; rows: number; roots: [number, number] } {
  const R = 2 ** DEPTH;
  const C0 = Math.max(1, Math.ceil(W / (s * R)));
  const R0 = Math.max(1, Math.ceil(H / (s * R)));
  return { cols: C0 * R + 1, rows: R0 * R + 1, roots: [C0, R0] };
}

/** Builds the adaptive mesh for the tolerance `o.tolerance` (projector pixels). */
export function buildAdaptiveMesh(tracer: Tracer, o: BakeOptions & AdaptiveOptions, areaMax: number, meta: Record<string, unknown>, lit: LitTest): TriangleWarpMesh {
  const { width: W, height: H } = tracer.frame;
  const lattice = adaptiveLattice(W, H, o.smallestCell);
  const f = buildMesh(tracer, lattice.cols, lattice.rows, o, areaMax, meta, lit, EDGE_CELLS);
  const xs = Float64Array.from({ length: lattice.cols }, (_, i) => (i * W) / (lattice.cols - 1));
  const ys = Float64Array.from({ length: lattice.rows }, (_, j) => (j * H) / (lattice.rows - 1));
  const g = tracer.grid(xs, ys, allocGridOutput(lattice.cols, lattice.rows));
  extrapolateMisses(f, Uint8Array.from(g.kind, (k) => (landsOnDome(k) ? 1 : 0)));
  return quadtreeMesh(f, lattice.roots, o.tolerance, o.masterSize);
}

/**
 * Beside the mirror's silhouette the smallest cells hold vertices whose light misses the mirror: the
 * uniform mesh gives them their neighbours' mean, which bends the map inside the lit part of those
 * cells. Here each such vertex next to traced ones takes the linear extrapolation 2·f(p + d) − f(p + 2d)
 * along each of the 8 lattice directions d with both points traced, averaged; a steep map stays straight
 * up to the edge.
 */
function extrapolateMisses(f: WarpMesh, traced: Uint8Array): void {
  const { cols, rows } = f;
  const dirs = [[1, 0], [-1, 0], [0, 1], [0, -1], [1, 1], [1, -1], [-1, 1], [-1, -1]];
  const nu = Float32Array.from(f.u);
  const nv = Float32Array.from(f.v);
  for (let r = 0; r < rows; r++)
    for (let c = 0; c < cols; c++) {
      const k = r * cols + c;
      if (traced[k]) continue;
      let su = 0;
      let sv = 0;
      let n = 0;
      for (const [dc, dr] of dirs) {
        const c2 = c + 2 * dc;
        const r2 = r + 2 * dr;
        if (c2 < 0 || r2 < 0 || c2 >= cols || r2 >= rows) continue;
        const k1 = k + dr * cols + dc;
        const k2 = k + 2 * (dr * cols + dc);
        if (!traced[k1] || !traced[k2]) continue;
        su += 2 * f.u[k1] - f.u[k2];
        sv += 2 * f.v[k1] - f.v[k2];
        n++;
      }
      if (n > 0) {
        nu[k] = su / n;
        nv[k] = sv / n;
      }
    }
  f.u.set(nu);
  f.v.set(nv);
}

/** The restricted quadtree over a traced lattice of roots[0]·2^DEPTH × roots[1]·2^DEPTH cells. */
export function quadtreeMesh(f: WarpMesh, roots: [number, number], tolerance: number, N: number): TriangleWarpMesh {
  const { cols, rows } = f;
  const FC = cols - 1; // fine cells across
  const FR = rows - 1;
  const R = 2 ** DEPTH;
  if (FC !== roots[0] * R || FR !== roots[1] * R) throw new Error(`Expected a lattice of ${roots[0] * R + 1}×${roots[1] * R + 1} but received ${cols}×${rows}`);
  const inv = inverseJacobians(f, N);
  /** Leaf size (in fine cells) of the leaf holding each fine cell. */
  const leaf = new Uint8Array(FC * FR);
  /** Marks the s × s fine cells from (c, r) as held by leaves of size `size` (s, or s/2 when split in four). */
  const setLeaf = (c: number, r: number, s: number, size = s) => {
    for (let j = r; j < r + s; j++) leaf.fill(size, j * FC + c, j * FC + c + s);
  };
  const needsSplit = (c: number, r: number, s: number): boolean => {
    if (s === 1) return false;
    let lit = false;
    let dark = false;
    let ramp = false;
    for (let j = r; j <= r + s; j++)
      for (let i = c; i <= c + s; i++) {
        const m = f.mask[j * cols + i];
        if (m >= 1) lit = true;
        else if (m <= 0) dark = true;
        else ramp = true;
      }
    // the edge crosses no cell larger than the ramp is wide (drawn there, the ramp's 0.5 level is the edge)
    if ((ramp || (lit && dark)) && s > EDGE_CELLS) return true;
    if (!lit && !ramp) return false; // all dark
    const k00 = r * cols + c;
    const k10 = k00 + s;
    const k01 = k00 + s * cols;
    const k11 = k01 + s;
    const limit = 0.9 * tolerance; // a margin: the final measure samples between lattice points too
    for (let j = 0; j <= s; j++)
      for (let i = 0; i <= s; i++) {
        const fx = i / s;
        const fy = j / s;
        const k = (r + j) * cols + (c + i);
        if (f.mask[k] < 0.5) continue; // outside the edge: no content to misplace
        if (Number.isNaN(inv[4 * k])) return true;
        // the triangles (tl, bl, br) and (tl, br, tr), as the grid's
        const lerp = (a: Float32Array) => (fy >= fx ? a[k00] + fy * (a[k01] - a[k00]) + fx * (a[k11] - a[k01]) : a[k00] + fx * (a[k10] - a[k00]) + fy * (a[k11] - a[k10]));
        const du = (lerp(f.u) - f.u[k]) * N;
        const dv = (lerp(f.v) - f.v[k]) * N;
        const px = inv[4 * k] * du + inv[4 * k + 1] * dv;
        const py = inv[4 * k + 2] * du + inv[4 * k + 3] * dv;
        if (px * px + py * py > limit * limit) return true;
      }
    return false;
  };
  const refine = (c: number, r: number, s: number) => {
    if (needsSplit(c, r, s)) {
      const h = s / 2;
      refine(c, r, h);
      refine(c + h, r, h);
      refine(c, r + h, h);
      refine(c + h, r + h, h);
    } else setLeaf(c, r, s);
  };
  for (let j = 0; j < roots[1]; j++) for (let i = 0; i < roots[0]; i++) refine(i * R, j * R, R);

  // 2:1 balance: split any leaf with a neighbour across a side smaller than half its size
  const smallestAcross = (c: number, r: number, s: number): number[] => {
    const out = [R + 1, R + 1, R + 1, R + 1]; // left, bottom, right, top
    for (let t = 0; t < s; t++) {
      if (c > 0) out[0] = Math.min(out[0], leaf[(r + t) * FC + c - 1]);
      if (r + s < FR) out[1] = Math.min(out[1], leaf[(r + s) * FC + c + t]);
      if (c + s < FC) out[2] = Math.min(out[2], leaf[(r + t) * FC + c + s]);
      if (r > 0) out[3] = Math.min(out[3], leaf[(r - 1) * FC + c + t]);
    }
    return out;
  };
  const forEachLeaf = (fn: (c: number, r: number, s: number) => void) => {
    for (let r = 0; r < FR; r++)
      for (let c = 0; c < FC; c++) {
        const s = leaf[r * FC + c];
        if (c % s === 0 && r % s === 0) fn(c, r, s);
      }
  };
  for (let changed = true; changed; ) {
    changed = false;
    forEachLeaf((c, r, s) => {
      if (s > 1 && Math.min(...smallestAcross(c, r, s)) < s / 2) {
        setLeaf(c, r, s, s / 2);
        changed = true;
      }
    });
  }

  // triangles; vertices are the lattice points used
  const vertexOf = new Int32Array(cols * rows).fill(-1);
  const used: number[] = [];
  const vid = (i: number, j: number): number => {
    const k = j * cols + i;
    if (vertexOf[k] < 0) {
      vertexOf[k] = used.length;
      used.push(k);
    }
    return vertexOf[k];
  };
  const tris: number[] = [];
  forEachLeaf((c, r, s) => {
    const [left, bottom, right, top] = smallestAcross(c, r, s);
    if (!(left < s || bottom < s || right < s || top < s)) {
      const tl = vid(c, r);
      const tr = vid(c + s, r);
      const bl = vid(c, r + s);
      const br = vid(c + s, r + s);
      tris.push(tl, bl, br, tl, br, tr);
      return;
    }
    const h = s / 2;
    const ring: number[] = [vid(c, r)];
    if (left < s) ring.push(vid(c, r + h));
    ring.push(vid(c, r + s));
    if (bottom < s) ring.push(vid(c + h, r + s));
    ring.push(vid(c + s, r + s));
    if (right < s) ring.push(vid(c + s, r + h));
    ring.push(vid(c + s, r));
    if (top < s) ring.push(vid(c + h, r));
    const centre = vid(c + h, r + h);
    for (let q = 0; q < ring.length; q++) tris.push(centre, ring[q], ring[(q + 1) % ring.length]);
  });

  const pick = (a: Float32Array) => Float32Array.from(used, (k) => a[k]);
  const x = Float32Array.from(used, (k) => ((k % cols) * f.width) / FC);
  const y = Float32Array.from(used, (k) => (Math.floor(k / cols) * f.height) / FR);
  return { width: f.width, height: f.height, x, y, u: pick(f.u), v: pick(f.v), brightness: pick(f.brightness), mask: pick(f.mask), indices: Uint32Array.from(tris), meta: f.meta };
}

/**
 * Calls `fn(pixel, a, b, c, wa, wb, wc)` for every projector pixel centre (i + 0.5, j + 0.5) inside a
 * triangle of the mesh, once per pixel (the first triangle that holds it), with its barycentric weights.
 */
export function rasterTriangles(m: Pick<TriangleWarpMesh, 'width' | 'height' | 'x' | 'y' | 'indices'>, fn: (k: number, a: number, b: number, c: number, wa: number, wb: number, wc: number) => void): void {
  const W = m.width;
  const H = m.height;
  const done = new Uint8Array(W * H);
  const eps = -1e-7;
  for (let t = 0; t < m.indices.length; t += 3) {
    const a = m.indices[t];
    const b = m.indices[t + 1];
    const c = m.indices[t + 2];
    const ax = m.x[a], ay = m.y[a], bx = m.x[b], by = m.y[b], cx = m.x[c], cy = m.y[c];
    const det = (bx - ax) * (cy - ay) - (cx - ax) * (by - ay);
    if (det === 0) continue;
    const i0 = Math.max(0, Math.floor(Math.min(ax, bx, cx) - 0.5));
    const i1 = Math.min(W - 1, Math.ceil(Math.max(ax, bx, cx) - 0.5));
    const j0 = Math.max(0, Math.floor(Math.min(ay, by, cy) - 0.5));
    const j1 = Math.min(H - 1, Math.ceil(Math.max(ay, by, cy) - 0.5));
    for (let j = j0; j <= j1; j++) {
      const py = j + 0.5;
      for (let i = i0; i <= i1; i++) {
        const k = j * W + i;
        if (done[k]) continue;
        const px = i + 0.5;
        const wb = ((px - ax) * (cy - ay) - (cx - ax) * (py - ay)) / det;
        const wc = ((bx - ax) * (py - ay) - (px - ax) * (by - ay)) / det;
        const wa = 1 - wb - wc;
        if (wa < eps || wb < eps || wc < eps) continue;
        done[k] = 1;
        fn(k, a, b, c, wa, wb, wc);
      }
    }
  }
}

export interface TriangleAccuracy {
  vertices: number;
  triangles: number;
  /** Lit projector pixels measured (the exact trace lights them and a triangle holds them). */
  pixels: number;
  /** Share of the lit pixels where the mesh puts content within the tolerance, projector pixels. */
  withinTolerance: number;
  errorP99Projector: number;
  errorP999Projector: number;
  errorMaxProjector: number;
}

/**
 * How far a triangle mesh puts content from the exact trace, at every lit projector pixel centre
 * (the whole lit area, the silhouette included), in projector pixels through the inverse of the
 * trace's local Jacobian (central differences over the neighbouring pixel centres). `exact`: the
 * per-pixel trace (Tracer.frameGrid) and whether each pixel shows content.
 */
export function measureTriangles(mesh: TriangleWarpMesh, exact: { u: ArrayLike<number>; v: ArrayLike<number> }, litAt: Uint8Array, N: number, tolerance: number): TriangleAccuracy {
  const W = mesh.width;
  const H = mesh.height;
  const errs: number[] = [];
  const d = (k: number, m: number, p: number, okM: boolean, okP: boolean, a: ArrayLike<number>) =>
    okM && okP ? (a[p] - a[m]) / 2 : okP ? a[p] - a[k] : okM ? a[k] - a[m] : Number.NaN;
  rasterTriangles(mesh, (k, a, b, c, wa, wb, wc) => {
    if (!litAt[k]) return;
    const i = k % W;
    const j = (k - i) / W;
    const du = (wa * mesh.u[a] + wb * mesh.u[b] + wc * mesh.u[c] - exact.u[k]) * N;
    const dv = (wa * mesh.v[a] + wb * mesh.v[b] + wc * mesh.v[c] - exact.v[k]) * N;
    const ml = i > 0 && litAt[k - 1] === 1;
    const mr = i + 1 < W && litAt[k + 1] === 1;
    const mt = j > 0 && litAt[k - W] === 1;
    const mb = j + 1 < H && litAt[k + W] === 1;
    const a11 = N * d(k, k - 1, k + 1, ml, mr, exact.u);
    const a21 = N * d(k, k - 1, k + 1, ml, mr, exact.v);
    const a12 = N * d(k, k - W, k + W, mt, mb, exact.u);
    const a22 = N * d(k, k - W, k + W, mt, mb, exact.v);
    const det = a11 * a22 - a12 * a21;
    // a lone lit pixel has no slope to measure by: its error counts as unbounded
    errs.push(Math.abs(det) > 1e-12 ? Math.hypot((a22 * du - a12 * dv) / det, (-a21 * du + a11 * dv) / det) : Infinity);
  });
  const within = errs.filter((e) => e <= tolerance).length;
  const finite = errs.map((e) => (Number.isFinite(e) ? e : Number.MAX_VALUE));
  return {
    vertices: mesh.x.length,
    triangles: mesh.indices.length / 3,
    pixels: errs.length,
    withinTolerance: errs.length ? within / errs.length : 0,
    errorP99Projector: quantile(finite, 0.99),
    errorP999Projector: quantile(finite, 0.999),
    errorMaxProjector: finite.reduce((m, x) => (x > m ? x : m), 0),
  };
}

export interface AdaptiveBake {
  mesh: TriangleWarpMesh;
  /** The adaptive mesh measured at every lit projector pixel centre. */
  accuracy: TriangleAccuracy;
  /** The uniform grid of the same bake, measured the same way. */
  uniform: TriangleAccuracy;
}

/** The adaptive mesh beside a uniform bake of the same rig and settings, both measured at every lit pixel. */
export function bakeAdaptive(rig: Rig, uniform: BakeResult, options: AdaptiveOptions, meta: Record<string, unknown> = {}): AdaptiveBake {
  const o = { ...uniform.options, ...options };
  const tracer = new Tracer(rig);
  const lit = litTest(tracer);
  const mesh = buildAdaptiveMesh(tracer, o, referenceArea(tracer), meta, lit);
  const g = tracer.frameGrid({});
  const litAt = new Uint8Array(g.cols * g.rows);
  for (let k = 0; k < litAt.length; k++) litAt[k] = contentVisible(tracer, g.u[k], g.v[k], g.kind[k]) ? 1 : 0;
  return {
    mesh,
    accuracy: measureTriangles(mesh, g, litAt, o.masterSize, o.tolerance),
    uniform: measureTriangles(gridAsTriangles(uniform.mesh), g, litAt, o.masterSize, o.tolerance),
  };
}
