/**
 * The report's coarse trace of the projector frame: a corner-to-corner vertex grid, what each vertex's
 * light does (its `HitKind`, as `classifyHit` refines it for the report), and the dome solid angle and area of each grid cell. Cells whose corners
 * disagree are split (midpoint subdivision) so the lit region's edge — the mirror's silhouette, the
 * cap's rim, the horizon, the content's edge — is followed to a fraction of a pixel.
 */
import { pixelToRay } from '../optics/projector.js';
import type { Vec3 } from '../math.js';
import { allocGridOutput, HitKind, Tracer, type HitKindCode } from '../trace.js';
import { segmentHitsBody } from './body.js';


export interface FrameSample {
  tracer: Tracer;
  cols: number;
  rows: number;
  /** Vertex coordinates in projector pixels, 0..W and 0..H. */
  xs: Float64Array;
  ys: Float64Array;
  /** Projector pixels per cell across and down. */
  cellW: number;
  cellH: number;
  /** `HitKind` of each vertex as `classifyHit` gives it: MirrorMiss, Lit, Shadow, OutsideContent or BelowHorizon. */
  kind: Uint8Array;
  /** Unit direction from the content's eye to the dome point (3 per vertex; NaN on a miss). */
  dir: Float64Array;
  /** Dome point (3 per vertex; on the continued sphere below the springline too; NaN on a miss). */
  point: Float64Array;
  /** Mirror point (3 per vertex; NaN on a miss). */
  mirrorPoint: Float64Array;
  /** Unit ray leaving the lens (3 per vertex). */
  ray: Float64Array;
  /** Lens-to-mirror distance along the ray (NaN on a miss). */
  mirrorDistance: Float64Array;
  /** Fisheye (u, v) (NaN on a miss). */
  u: Float64Array;
  v: Float64Array;
}

export interface SampleOptions {
  /** About how many vertices to trace. */
  vertices: number;
}

/**
 * The report's `HitKind` of one traced point: a dome hit becomes Lit, Shadow (of the projector body) or
 * OutsideContent, an opening of an as-built dome counts as BelowHorizon. The shadow test runs only when
 * the rig has a body.
 */
export function classifyHit(tracer: Tracer, kind: number, u: number, v: number, X: Vec3, D: Vec3): HitKindCode {
  if (kind === HitKind.MirrorMiss) return HitKind.MirrorMiss;
  // light through an opening of an as-built dome lands in the room, as light below the springline does
  if (kind === HitKind.BelowHorizon || kind === HitKind.Open) return HitKind.BelowHorizon;
  const du = u - 0.5;
  const dv = v - 0.5;
  if (du * du + dv * dv > 0.25 + 1e-12) return HitKind.OutsideContent;
  const body = tracer.rig.projector.body;
  if (body && segmentHitsBody(body, tracer.frame, X, D)) return HitKind.Shadow;
  return HitKind.Lit;
}

/** Traces the vertex grid of about `vertices` points spread evenly over the frame. */
export function sampleFrame(tracer: Tracer, o: SampleOptions): FrameSample {
  const { width: W, height: H } = tracer.frame;
  const step = Math.sqrt((W * H) / Math.max(4, o.vertices));
  const cols = Math.max(2, Math.round(W / step) + 1);
  const rows = Math.max(2, Math.round(H / step) + 1);
  const xs = Float64Array.from({ length: cols }, (_, i) => (i * W) / (cols - 1));
  const ys = Float64Array.from({ length: rows }, (_, j) => (j * H) / (rows - 1));
  const g = tracer.grid(xs, ys, allocGridOutput(cols, rows, { points: true, mirrorDistance: true }));
  const n = cols * rows;
  const kind = new Uint8Array(n);
  const dir = new Float64Array(3 * n).fill(Number.NaN);
  const point = new Float64Array(3 * n).fill(Number.NaN);
  const mirrorPoint = new Float64Array(3 * n).fill(Number.NaN);
  const ray = new Float64Array(3 * n);
  const mirrorDistance = new Float64Array(n).fill(Number.NaN);
  const u = new Float64Array(n).fill(Number.NaN);
  const v = new Float64Array(n).fill(Number.NaN);
  const P = tracer.frame.origin;
  const e = tracer.rig.content.eye;
  const r: Vec3 = [0, 0, 0];
  const X: Vec3 = [0, 0, 0];
  const D: Vec3 = [0, 0, 0];
  for (let j = 0; j < rows; j++) {
    for (let i = 0; i < cols; i++) {
      const k = j * cols + i;
      pixelToRay(r, tracer.frame, xs[i], ys[j]);
      ray[3 * k] = r[0];
      ray[3 * k + 1] = r[1];
      ray[3 * k + 2] = r[2];
      if (g.kind[k] === HitKind.MirrorMiss) {
        kind[k] = HitKind.MirrorMiss;
        continue;
      }
      const t = g.mirrorDistance![k];
      for (let a = 0; a < 3; a++) {
        X[a] = P[a] + t * r[a];
        D[a] = g.point![3 * k + a];
        mirrorPoint[3 * k + a] = X[a];
        point[3 * k + a] = D[a];
      }
      mirrorDistance[k] = t;
      u[k] = g.u[k];
      v[k] = g.v[k];
      const wx = D[0] - e[0], wy = D[1] - e[1], wz = D[2] - e[2];
      const wl = Math.sqrt(wx * wx + wy * wy + wz * wz);
      dir[3 * k] = wx / wl;
      dir[3 * k + 1] = wy / wl;
      dir[3 * k + 2] = wz / wl;
      kind[k] = classifyHit(tracer, g.kind[k], g.u[k], g.v[k], X, D);
    }
  }
  return { tracer, cols, rows, xs, ys, cellW: W / (cols - 1), cellH: H / (rows - 1), kind, dir, point, mirrorPoint, ray, mirrorDistance, u, v };
}

/** Traces one point for the subdivision: its kind and direction from the eye (written to `dir`). */
export function probePoint(tracer: Tracer, x: number, y: number, dir: Vec3): HitKindCode {
  const h = tracer.pixel(x, y);
  if (h.kind === 'mirror-miss') return HitKind.MirrorMiss;
  if (h.kind === 'open') {
    dir[0] = h.reflected[0];
    dir[1] = h.reflected[1];
    dir[2] = h.reflected[2];
    return HitKind.BelowHorizon;
  }
  dir[0] = h.direction[0];
  dir[1] = h.direction[1];
  dir[2] = h.direction[2];
  return classifyHit(tracer, h.kind === 'dome' ? HitKind.Dome : HitKind.BelowHorizon, h.fisheye[0], h.fisheye[1], h.mirrorPoint, h.domePoint);
}

/**
 * Solid angle of the spherical triangle with unit-vector corners a, b, c (Van Oosterom & Strackee,
 * IEEE Trans. Biomed. Eng. 30 (1983) 125: tan(Ω/2) = |a·(b×c)| / (1 + a·b + b·c + c·a)).
 */
export function triangleSolidAngle(a: ArrayLike<number>, ia: number, b: ArrayLike<number>, ib: number, c: ArrayLike<number>, ic: number): number {
  const ax = a[ia], ay = a[ia + 1], az = a[ia + 2];
  const bx = b[ib], by = b[ib + 1], bz = b[ib + 2];
  const cx = c[ic], cy = c[ic + 1], cz = c[ic + 2];
  const triple = ax * (by * cz - bz * cy) + ay * (bz * cx - bx * cz) + az * (bx * cy - by * cx);
  const den = 1 + ax * bx + ay * by + az * bz + bx * cx + by * cy + bz * cz + cx * ax + cy * ay + cz * az;
  return 2 * Math.atan2(Math.abs(triple), den);
}

export interface CellMeasures {
  /** Lit solid angle seen from the eye per cell, steradians (subdivided at the edges). */
  omega: Float64Array;
  /** 1 where all four corners are lit: the per-pixel figures below are defined there. */
  full: Uint8Array;
  /** Solid angle per projector pixel (sr) in full cells, NaN elsewhere. */
  omegaPerPixel: Float64Array;
  /** Dome area per projector pixel (m²) in full cells, NaN elsewhere. */
  areaPerPixel: Float64Array;
  /** Total lit solid angle, steradians. */
  total: number;
}

const LEAF_SHARE = [0, 1 / 8, 1 / 2, 7 / 8, 1];

/**
 * Integrates the solid angle (from the eye) lit by the frame: whole cells as two spherical triangles
 * each (so the cells tile the lit region exactly), mixed cells split `depth` times, and the last
 * split's mixed cells estimated from the local density at a lit corner and the share of lit corners
 * (1/8, 1/2, 7/8 for a straight edge through one, two or three).
 */
export function cellMeasures(s: FrameSample, depth: number, accept: (kind: number) => boolean = (f) => f === HitKind.Lit): CellMeasures {
  const { cols, rows, kind, dir, point, cellW, cellH, xs, ys, tracer } = s;
  const nc = (cols - 1) * (rows - 1);
  const omega = new Float64Array(nc);
  const full = new Uint8Array(nc);
  const omegaPerPixel = new Float64Array(nc).fill(Number.NaN);
  const areaPerPixel = new Float64Array(nc).fill(Number.NaN);
  const px = cellW * cellH;
  let total = 0;
  for (let j = 0; j < rows - 1; j++) {
    for (let i = 0; i < cols - 1; i++) {
      const c = j * (cols - 1) + i;
      const k00 = j * cols + i;
      const k10 = k00 + 1;
      const k01 = k00 + cols;
      const k11 = k01 + 1;
      const l00 = accept(kind[k00]), l10 = accept(kind[k10]), l01 = accept(kind[k01]), l11 = accept(kind[k11]);
      const lit = +l00 + +l10 + +l01 + +l11;
      if (lit === 0) continue;
      let w: number;
      if (lit === 4) {
        w = triangleSolidAngle(dir, 3 * k00, dir, 3 * k10, dir, 3 * k11) + triangleSolidAngle(dir, 3 * k00, dir, 3 * k11, dir, 3 * k01);
        full[c] = 1;
        omegaPerPixel[c] = w / px;
        areaPerPixel[c] = (triArea(point, k00, k10, k11) + triArea(point, k00, k11, k01)) / px;
      } else {
        const corners = [
          { f: l00, d: dirAt(dir, k00) },
          { f: l10, d: dirAt(dir, k10) },
          { f: l01, d: dirAt(dir, k01) },
          { f: l11, d: dirAt(dir, k11) },
        ];
        w = splitCell(tracer, accept, xs[i], ys[j], xs[i + 1], ys[j + 1], corners, depth);
      }
      omega[c] = w;
      total += w;
    }
  }
  return { omega, full, omegaPerPixel, areaPerPixel, total };
}

function dirAt(dir: Float64Array, k: number): Vec3 {
  return [dir[3 * k], dir[3 * k + 1], dir[3 * k + 2]];
}

function triArea(p: Float64Array, a: number, b: number, c: number): number {
  const ux = p[3 * b] - p[3 * a], uy = p[3 * b + 1] - p[3 * a + 1], uz = p[3 * b + 2] - p[3 * a + 2];
  const vx = p[3 * c] - p[3 * a], vy = p[3 * c + 1] - p[3 * a + 1], vz = p[3 * c + 2] - p[3 * a + 2];
  const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
  return 0.5 * Math.sqrt(cx * cx + cy * cy + cz * cz);
}

interface Corner {
  f: boolean;
  d: Vec3;
}

/** Corners in the order (x0,y0), (x1,y0), (x0,y1), (x1,y1). */
function splitCell(tracer: Tracer, accept: (f: number) => boolean, x0: number, y0: number, x1: number, y1: number, c: Corner[], depth: number): number {
  const lit = +c[0].f + +c[1].f + +c[2].f + +c[3].f;
  if (lit === 0) return 0;
  if (lit === 4) return triangleSolidAngle(c[0].d, 0, c[1].d, 0, c[3].d, 0) + triangleSolidAngle(c[0].d, 0, c[3].d, 0, c[2].d, 0);
  if (depth <= 0) {
    // density at a lit corner from a small right-angled stencil pointing into the cell
    const idx = c.findIndex((q) => q.f);
    const cx = idx & 1 ? x1 : x0;
    const cy = idx & 2 ? y1 : y0;
    const hx = (idx & 1 ? -1 : 1) * 0.02 * (x1 - x0);
    const hy = (idx & 2 ? -1 : 1) * 0.02 * (y1 - y0);
    const da: Vec3 = [0, 0, 0];
    const db: Vec3 = [0, 0, 0];
    if (!accept(probePoint(tracer, cx + hx, cy, da)) || !accept(probePoint(tracer, cx, cy + hy, db))) return 0;
    const tri = triangleSolidAngle(c[idx].d, 0, da, 0, db, 0);
    const density = tri / (0.5 * Math.abs(hx * hy));
    return density * (x1 - x0) * (y1 - y0) * LEAF_SHARE[lit];
  }
  const xm = 0.5 * (x0 + x1);
  const ym = 0.5 * (y0 + y1);
  const mk = (x: number, y: number): Corner => {
    const d: Vec3 = [0, 0, 0];
    return { f: accept(probePoint(tracer, x, y, d)), d };
  };
  const top = mk(xm, y0);
  const left = mk(x0, ym);
  const mid = mk(xm, ym);
  const right = mk(x1, ym);
  const bottom = mk(xm, y1);
  return (
    splitCell(tracer, accept, x0, y0, xm, ym, [c[0], top, left, mid], depth - 1) +
    splitCell(tracer, accept, xm, y0, x1, ym, [top, c[1], mid, right], depth - 1) +
    splitCell(tracer, accept, x0, ym, xm, y1, [left, mid, c[2], bottom], depth - 1) +
    splitCell(tracer, accept, xm, ym, x1, y1, [mid, right, bottom, c[3]], depth - 1)
  );
}

/** Trapezoid weights of the vertices (each vertex stands for its share of the frame's area), summing to 1. */
export function vertexWeights(s: FrameSample): Float64Array {
  const w = new Float64Array(s.cols * s.rows);
  const total = (s.cols - 1) * (s.rows - 1);
  for (let j = 0; j < s.rows; j++) {
    const wj = j === 0 || j === s.rows - 1 ? 0.5 : 1;
    for (let i = 0; i < s.cols; i++) w[j * s.cols + i] = (wj * (i === 0 || i === s.cols - 1 ? 0.5 : 1)) / total;
  }
  return w;
}
