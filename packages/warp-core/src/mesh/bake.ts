/**
 * Baking the warp mesh (DESIGN.md "The warp mesh and its files"): a corner-to-corner vertex grid with
 * fisheye (u, v), brightness and mask, and an honest measure of how far bilinear interpolation across
 * its cells puts content from where the exact trace puts it.
 */
import { DEG } from '../math.js';
import { RigError, type Rig } from '../rig/model.js';
import { allocGridOutput, Tracer, landsOnDome } from '../trace.js';
import { edgeRamp, edgeSegments, angularScaleAt, litTest, measureEdgePlacement, type EdgePlacement, type LitTest } from './edge.js';
import { brightnessFactor, contentVisible, domeAreaOnGrid, fillUnlit, quantile, referenceArea } from './grid-samples.js';
import { createMesh, type WarpMesh } from './mesh.js';
import { notice, type Notice } from '../notice.js';

export interface BakeOptions {
  /** Vertices across and down; chosen from `tolerance` when absent. */
  grid?: [number, number];
  /** Largest interpolation error allowed over 99% of lit cells, projector pixels. */
  tolerance: number;
  /** Dome-master size N the errors in dome-master pixels refer to. */
  masterSize: number;
  /** Brightness compensation strength s in [0, 1]. */
  brightness: number;
  /** Lowest brightness factor. */
  brightnessFloor: number;
  /** Width in degrees on the dome of the mask's ramp across the edge (0 = the narrowest ramp the grid allows). */
  feather: number;
  /** Samples per cell side when measuring the error. */
  samplesPerCell: number;
  /** Largest number of vertices across when choosing the grid. */
  maxCols: number;
}

/** The one place bake defaults live (the CLI reads them too). */
export const BAKE_DEFAULTS: Readonly<BakeOptions> = {
  tolerance: 0.5,
  masterSize: 4096,
  brightness: 1,
  brightnessFloor: 0.1,
  feather: 0,
  samplesPerCell: 5,
  maxCols: 1025,
};

export interface MeshAccuracy {
  /** Lit cells measured (all four vertices light the dome within the content). */
  cells: number;
  /** Per-cell worst error, 99th percentile and maximum, in projector pixels and dome-master pixels. */
  errorP99Projector: number;
  errorMaxProjector: number;
  errorP99Px: number;
  errorMaxPx: number;
  /** Share of measured cells whose worst error exceeds the tolerance. */
  overTolerance: number;
  /** Projector pixel of the worst cell's worst sample. */
  worstAt: [number, number];
  /** True when the worst cell lies next to an unlit vertex (the mirror's rim or silhouette, the content edge). */
  worstNearEdge: boolean;
  /**
   * The same figures for the two triangles per cell that a GPU draws from the .glb (split along the
   * top-left to bottom-right diagonal), which interpolate a little worse than the bilinear cell.
   */
  triangles: { errorP99Projector: number; errorMaxProjector: number; errorP99Px: number; errorMaxPx: number; overTolerance: number };
}

/** Interpolates per-vertex values over cell (k00 top-left) at (fx, fy): bilinear, or the two triangles (tl, bl, br) and (tl, br, tr). */
export function interpolateCell(f: ArrayLike<number>, k00: number, cols: number, fx: number, fy: number, triangles: boolean): number {
  const a = f[k00];
  const b = f[k00 + 1];
  const c = f[k00 + cols];
  const d = f[k00 + cols + 1];
  if (!triangles) return (1 - fy) * ((1 - fx) * a + fx * b) + fy * ((1 - fx) * c + fx * d);
  return fy >= fx ? a + fy * (c - a) + fx * (d - c) : a + fx * (b - a) + fy * (d - b);
}

export interface BakeResult {
  mesh: WarpMesh;
  accuracy: MeshAccuracy;
  /** Where a player draws the edge of the lit area (the mask's 0.5 level) against the exact edge. */
  edge: EdgePlacement;
  /** Share of vertices that are lit (mask ≥ 0.5: inside the exact edge). */
  litFraction: number;
  brightnessMin: number;
  brightnessMax: number;
  /** The reference area A_max, m² per projector pixel. */
  areaMax: number;
  /** Plain-language remarks (e.g. where the tolerance cannot be met). */
  notes: Notice[];
  options: BakeOptions;
}

function vertexCoords(n: number, size: number): Float64Array {
  return Float64Array.from({ length: n }, (_, i) => (i * size) / (n - 1));
}

/**
 * Builds the mesh for a given grid: (u, v) per vertex, brightness, and the mask ramp across the exact
 * edge (edge.ts); unlit vertices carry (u, v) and brightness from their lit neighbours.
 */
export function buildMesh(tracer: Tracer, cols: number, rows: number, o: BakeOptions, areaMax: number, meta: Record<string, unknown> = {}, lit: LitTest = litTest(tracer), rampCells = 1): WarpMesh {
  const { width: W, height: H } = tracer.frame;
  const xs = vertexCoords(cols, W);
  const ys = vertexCoords(rows, H);
  const g = tracer.grid(xs, ys, allocGridOutput(cols, rows));
  const area = domeAreaOnGrid(tracer, xs, ys);
  const mesh = createMesh(cols, rows, W, H, meta);
  const n = cols * rows;
  const litAt = new Uint8Array(n);
  const traced = new Uint8Array(n);
  for (let k = 0; k < n; k++) {
    traced[k] = landsOnDome(g.kind[k]) ? 1 : 0;
    litAt[k] = contentVisible(tracer, g.u[k], g.v[k], g.kind[k]) ? 1 : 0;
    mesh.brightness[k] = litAt[k] ? brightnessFactor(area[k], areaMax, { strength: o.brightness, floor: o.brightnessFloor }) : 0;
  }
  const segments = edgeSegments(lit, xs, ys, litAt);
  // 1% over the cell diagonal (of `rampCells` cells a side, for the adaptive mesh's edge cells): every
  // vertex of a triangle the edge crosses stays inside the ramp
  const minHalfWidth = 1.01 * rampCells * Math.hypot(W / (cols - 1), H / (rows - 1));
  mesh.mask.set(edgeRamp(segments, xs, ys, litAt, { minHalfWidth, featherRad: o.feather * DEG, angularScale: o.feather > 0 ? angularScaleAt(tracer, lit) : undefined }));
  fillUnlit(cols, rows, traced, g.u, g.v);
  fillUnlit(cols, rows, litAt, mesh.brightness);
  mesh.u.set(g.u);
  mesh.v.set(g.v);
  return mesh;
}

/**
 * Measures the bilinear interpolation error of the mesh against the exact trace at k×k points inside
 * every fully lit cell. The error in dome-master pixels δ is turned into projector pixels by the
 * inverse of the local Jacobian J = ∂(u·N, v·N)/∂(x, y): |J⁻¹δ| is how far, in projector pixels, the
 * mesh shifts the content.
 */
export function measureAccuracy(tracer: Tracer, mesh: WarpMesh, masterSize: number, k = 5, tolerance = 0.5): MeshAccuracy {
  const { cols, rows, width: W, height: H } = mesh;
  const cw = W / (cols - 1);
  const ch = H / (rows - 1);
  const sx = new Float64Array((cols - 1) * k);
  const sy = new Float64Array((rows - 1) * k);
  for (let c = 0; c < cols - 1; c++) for (let a = 0; a < k; a++) sx[c * k + a] = (c + (a + 0.5) / k) * cw;
  for (let r = 0; r < rows - 1; r++) for (let a = 0; a < k; a++) sy[r * k + a] = (r + (a + 0.5) / k) * ch;
  const nx = sx.length;
  const ny = sy.length;
  const h = 0.5;
  const g = tracer.grid(sx, sy, allocGridOutput(nx, ny));
  const gxm = tracer.grid(sx.map((x) => x - h), sy, allocGridOutput(nx, ny));
  const gxp = tracer.grid(sx.map((x) => x + h), sy, allocGridOutput(nx, ny));
  const gym = tracer.grid(sx, sy.map((y) => y - h), allocGridOutput(nx, ny));
  const gyp = tracer.grid(sx, sy.map((y) => y + h), allocGridOutput(nx, ny));
  const N = masterSize;
  const cellPx: number[] = [];
  const cellProj: number[] = [];
  const triPx: number[] = [];
  const triProj: number[] = [];
  let worst = -1;
  let worstAt: [number, number] = [0, 0];
  let worstCell = -1;
  for (let r = 0; r < rows - 1; r++) {
    for (let c = 0; c < cols - 1; c++) {
      const v00 = r * cols + c;
      const v10 = v00 + 1;
      const v01 = v00 + cols;
      const v11 = v01 + 1;
      if (!(mesh.mask[v00] >= 0.5 && mesh.mask[v10] >= 0.5 && mesh.mask[v01] >= 0.5 && mesh.mask[v11] >= 0.5)) continue;
      let maxPx = 0;
      let maxProj = 0;
      let maxTriPx = 0;
      let maxTriProj = 0;
      let at: [number, number] = [0, 0];
      let measured = false;
      for (let b = 0; b < k; b++) {
        const fy = (b + 0.5) / k;
        for (let a = 0; a < k; a++) {
          const fx = (a + 0.5) / k;
          const idx = (r * k + b) * nx + (c * k + a);
          if (!landsOnDome(g.kind[idx])) continue;
          const mu = interpolateCell(mesh.u, v00, cols, fx, fy, false);
          const mv = interpolateCell(mesh.v, v00, cols, fx, fy, false);
          const du = (mu - g.u[idx]) * N;
          const dv = (mv - g.v[idx]) * N;
          const ePx = Math.hypot(du, dv);
          const tu = (interpolateCell(mesh.u, v00, cols, fx, fy, true) - g.u[idx]) * N;
          const tv = (interpolateCell(mesh.v, v00, cols, fx, fy, true) - g.v[idx]) * N;
          const tPx = Math.hypot(tu, tv);
          let tProj = Infinity;
          // local Jacobian in dome-master pixels per projector pixel (one-sided where a neighbour misses)
          const jx = deriv(g, gxm, gxp, idx, h);
          const jy = deriv(g, gym, gyp, idx, h);
          let eProj: number;
          if (jx && jy) {
            const a11 = jx[0] * N, a21 = jx[1] * N, a12 = jy[0] * N, a22 = jy[1] * N;
            const det = a11 * a22 - a12 * a21;
            if (Math.abs(det) > 1e-12) {
              const px = (a22 * du - a12 * dv) / det;
              const py = (-a21 * du + a11 * dv) / det;
              eProj = Math.hypot(px, py);
              tProj = Math.hypot((a22 * tu - a12 * tv) / det, (-a21 * tu + a11 * tv) / det);
            } else eProj = Infinity;
          } else eProj = Infinity;
          measured = true;
          if (tPx > maxTriPx) maxTriPx = tPx;
          if (tProj > maxTriProj) maxTriProj = tProj;
          if (ePx > maxPx) maxPx = ePx;
          if (eProj > maxProj) {
            maxProj = eProj;
            at = [sx[c * k + a], sy[r * k + b]];
          }
        }
      }
      if (!measured) continue;
      cellPx.push(maxPx);
      cellProj.push(maxProj);
      triPx.push(maxTriPx);
      triProj.push(maxTriProj);
      if (maxProj > worst) {
        worst = maxProj;
        worstAt = at;
        worstCell = r * cols + c;
      }
    }
  }
  const over = cellProj.filter((e) => e > tolerance).length;
  const finite = (a: number[]) => a.map((e) => (Number.isFinite(e) ? e : Number.MAX_VALUE));
  const maxOf = (a: number[]) => a.reduce((m, x) => (x > m ? x : m), 0);
  const finiteProj = finite(cellProj);
  const finiteTri = finite(triProj);
  let nearEdge = false;
  if (worstCell >= 0) {
    const c0 = worstCell % cols;
    const r0 = (worstCell - c0) / cols;
    for (let dr = -2; dr <= 3 && !nearEdge; dr++)
      for (let dc = -2; dc <= 3 && !nearEdge; dc++) {
        const rr = r0 + dr;
        const cc = c0 + dc;
        if (rr >= 0 && cc >= 0 && rr < rows && cc < cols && mesh.mask[rr * cols + cc] < 0.5) nearEdge = true;
      }
  }
  return {
    cells: cellProj.length,
    errorP99Projector: quantile(finiteProj, 0.99),
    errorMaxProjector: maxOf(finiteProj),
    errorP99Px: quantile(cellPx, 0.99),
    errorMaxPx: cellPx.length ? cellPx.reduce((m, x) => (x > m ? x : m), 0) : 0,
    overTolerance: cellProj.length ? over / cellProj.length : 0,
    worstAt,
    worstNearEdge: nearEdge,
    triangles: {
      errorP99Projector: quantile(finiteTri, 0.99),
      errorMaxProjector: maxOf(finiteTri),
      errorP99Px: quantile(triPx, 0.99),
      errorMaxPx: maxOf(triPx),
      overTolerance: triProj.length ? triProj.filter((e) => e > tolerance).length / triProj.length : 0,
    },
  };
}

function deriv(c: { kind: Uint8Array; u: ArrayLike<number>; v: ArrayLike<number> }, m: typeof c, p: typeof c, k: number, h: number): [number, number] | null {
  const hasM = landsOnDome(m.kind[k]);
  const hasP = landsOnDome(p.kind[k]);
  if (hasM && hasP) return [(p.u[k] - m.u[k]) / (2 * h), (p.v[k] - m.v[k]) / (2 * h)];
  if (hasP) return [(p.u[k] - c.u[k]) / h, (p.v[k] - c.v[k]) / h];
  if (hasM) return [(c.u[k] - m.u[k]) / h, (c.v[k] - m.v[k]) / h];
  return null;
}

/**
 * Bakes the mesh. With no `grid`, starts coarse and refines (bilinear error falls as the square of
 * the cell size) until the 99th percentile of the per-cell error is within tolerance or the grid
 * reaches `maxCols` (or one vertex per projector pixel).
 */
export function bakeMesh(rig: Rig, options: Partial<BakeOptions> = {}, meta: Record<string, unknown> = {}): BakeResult {
  const o: BakeOptions = { ...BAKE_DEFAULTS, ...options };
  const tracer = new Tracer(rig);
  const { width: W, height: H } = tracer.frame;
  const areaMax = referenceArea(tracer);
  const litOf = litTest(tracer);
  const rowsFor = (cols: number) => Math.max(2, Math.round(((cols - 1) * H) / W) + 1);
  const limit = Math.min(o.maxCols, W + 1);
  let cols = o.grid ? o.grid[0] : Math.min(65, limit);
  let rows = o.grid ? o.grid[1] : rowsFor(cols);
  let mesh: WarpMesh;
  let accuracy: MeshAccuracy;
  for (let iter = 0; ; iter++) {
    mesh = buildMesh(tracer, cols, rows, o, areaMax, meta, litOf);
    if (iter === 0 && !mesh.mask.some((m) => m > 0) && !litOnCheckGrid(tracer, W, H)) {
      // a mesh of nothing but mask 0 cannot be measured and no player can use it: the rig is wrong
      throw new RigError('projector', `no vertex of the mesh shows content: ${SHOWS_NOTHING}`);
    }
    accuracy = measureAccuracy(tracer, mesh, o.masterSize, o.samplesPerCell, o.tolerance);
    // both the bilinear cell and the two triangles a GPU draws must meet the tolerance
    const p99 = Math.max(accuracy.errorP99Projector, accuracy.triangles.errorP99Projector);
    if (o.grid || !Number.isFinite(p99) || p99 <= o.tolerance || cols >= limit || iter >= 8) break;
    const factor = Math.sqrt(p99 / o.tolerance) * 1.15;
    const next = Math.min(limit, Math.max(cols + 16, Math.ceil((cols - 1) * Math.min(factor, 4)) + 1));
    cols = next;
    rows = rowsFor(cols);
  }
  const n = mesh.cols * mesh.rows;
  let lit = 0;
  let bMin = Infinity;
  let bMax = -Infinity;
  for (let k = 0; k < n; k++) {
    if (mesh.mask[k] >= 0.5) {
      // brightness of unlit vertices is filled from lit neighbours; only lit ones count here
      lit++;
      if (mesh.brightness[k] < bMin) bMin = mesh.brightness[k];
      if (mesh.brightness[k] > bMax) bMax = mesh.brightness[k];
    }
  }
  if (accuracy.cells === 0) {
    throw new RigError('projector', `the lit part of the frame is too small to measure: no cell of the ${mesh.cols} x ${mesh.rows} grid is lit at all four corners (give a finer grid, or check the rig)`);
  }
  const notes: Notice[] = [];
  const worstP99 = Math.max(accuracy.errorP99Projector, accuracy.triangles.errorP99Projector);
  if (worstP99 > o.tolerance) {
    const text =
      `the tolerance of ${o.tolerance} projector pixel is not met over 99% of lit cells (p99 ${accuracy.errorP99Projector.toFixed(2)} bilinear, ${accuracy.triangles.errorP99Projector.toFixed(2)} as triangles); ` +
      (o.grid ? 'use a finer {option:grid} or drop {option:grid} to let bake choose' : `the grid stopped at ${mesh.cols} vertices across`);
    notes.push(notice('bake.tolerance-unmet', text));
  }
  if (accuracy.overTolerance > 0) {
    const text =
      `${(accuracy.overTolerance * 100).toFixed(2)}% of lit cells exceed the tolerance; the worst (${fmt(accuracy.errorMaxProjector)} projector px) is at pixel ${accuracy.worstAt.map((x) => x.toFixed(0)).join(', ')}` +
      (accuracy.worstNearEdge ? ", next to the edge of the lit area, where the light grazes the mirror's silhouette and the map's slope grows without bound" : '');
    notes.push(notice('bake.cells-over-tolerance', text));
  }
  const edge = measureEdgePlacement(litOf, mesh);
  return { mesh, accuracy, edge, litFraction: lit / n, brightnessMin: lit ? bMin : 0, brightnessMax: lit ? bMax : 0, areaMax, notes, options: o };
}

const SHOWS_NOTHING = "the projector's frame misses the mirror, or lands outside content.fov (check projector.lookAt, projector.lensShift and mirror.center)";

/**
 * Throws a RigError naming the reason when no point of the projector's frame shows content (the
 * test bake refuses a mesh by), so that warping straight from the rig refuses it too.
 */
export function checkShowsContent(rig: Rig): void {
  const tracer = new Tracer(rig);
  const { width: W, height: H } = tracer.frame;
  if (!litOnCheckGrid(tracer, W, H)) throw new RigError('projector', `no point of the frame shows content: ${SHOWS_NOTHING}`);
}

/** True when some pixel of a 257-across check grid shows content: a coarse grid may straddle a small lit area. */
function litOnCheckGrid(tracer: Tracer, W: number, H: number): boolean {
  const cols = Math.min(257, W + 1);
  const rows = Math.max(2, Math.min(H + 1, Math.round(((cols - 1) * H) / W) + 1));
  const g = tracer.grid(vertexCoords(cols, W), vertexCoords(rows, H), allocGridOutput(cols, rows));
  for (let k = 0; k < cols * rows; k++) if (contentVisible(tracer, g.u[k], g.v[k], g.kind[k])) return true;
  return false;
}

function fmt(x: number): string {
  return Number.isFinite(x) && x < 1e6 ? x.toFixed(2) : 'unbounded';
}
