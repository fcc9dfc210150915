/**
 * The edge of the lit area in the projector frame, and the mask ramp across it (DESIGN.md "The warp
 * mesh and its files"): whatever bounds the light — the mirror's silhouette or cap rim, the content's
 * edge (the springline at fov 180), a gap in an as-built dome — is found by bisection on the trace
 * itself, so every kind of edge is handled alike.
 *
 * Each vertex's mask is 0.5 + d / (2h), clamped to [0, 1], with d the signed distance (projector
 * pixels, positive inside) from the vertex to the exact edge and h the ramp's half-width. Where the
 * edge is straight across a triangle and the triangle's three vertices lie inside the ramp, a player
 * interpolating the mask linearly over the triangle puts the 0.5 level exactly on the edge; h is
 * therefore at least a cell's diagonal, the farthest a vertex of a triangle the edge crosses can be
 * from it. A feather widens the same ramp.
 */
import { allocGridOutput, type Tracer } from '../trace.js';
import { contentVisible, quantile } from './grid-samples.js';
import type { WarpMesh } from './mesh.js';

/** Is projector pixel coordinate (x, y) lit (its light lands on the dome, within the content)? */
export type LitTest = (x: number, y: number) => boolean;

/** The lit test of a rig, by the same grid trace and the same rule the bake's vertices use. */
export function litTest(tracer: Tracer): LitTest {
  const xs = new Float64Array(1);
  const ys = new Float64Array(1);
  const out = allocGridOutput(1, 1);
  return (x, y) => {
    xs[0] = x;
    ys[0] = y;
    tracer.grid(xs, ys, out);
    return contentVisible(tracer, out.u[0], out.v[0], out.kind[0]);
  };
}

/** Bisection stops when the bracket is this short, projector pixels. */
const BISECT_PX = 1e-4;

/**
 * Where the lit state changes on the segment from a (state `litA`) to b (the other state): the
 * parameter t in [0, 1], to BISECT_PX.
 */
function bisect(lit: LitTest, ax: number, ay: number, litA: boolean, bx: number, by: number): number {
  let lo = 0;
  let hi = 1;
  const len = Math.hypot(bx - ax, by - ay);
  while ((hi - lo) * len > BISECT_PX) {
    const mid = 0.5 * (lo + hi);
    if (lit(ax + mid * (bx - ax), ay + mid * (by - ay)) === litA) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * The exact edge as a polyline: marching squares over the vertex grid (xs × ys, lit state per vertex),
 * each crossing bisected onto the edge, each segment then split at the edge point found along its
 * normal until it departs from the edge by less than `chordPx`. Returns x0, y0, x1, y1 per segment.
 */
export function edgeSegments(lit: LitTest, xs: ArrayLike<number>, ys: ArrayLike<number>, litAt: Uint8Array, chordPx = 0.01): Float64Array {
  const cols = xs.length;
  const rows = ys.length;
  // crossing points on the horizontal (between (c, r) and (c + 1, r)) and vertical grid edges, NaN = none
  const hx = new Float64Array(rows * cols).fill(Number.NaN);
  const vy = new Float64Array(rows * cols).fill(Number.NaN);
  for (let r = 0; r < rows; r++)
    for (let c = 0; c < cols; c++) {
      const k = r * cols + c;
      if (c + 1 < cols && litAt[k] !== litAt[k + 1]) hx[k] = xs[c] + bisect(lit, xs[c], ys[r], litAt[k] === 1, xs[c + 1], ys[r]) * (xs[c + 1] - xs[c]);
      if (r + 1 < rows && litAt[k] !== litAt[k + cols]) vy[k] = ys[r] + bisect(lit, xs[c], ys[r], litAt[k] === 1, xs[c], ys[r + 1]) * (ys[r + 1] - ys[r]);
    }
  const out: number[] = [];
  const pts: number[] = [];
  for (let r = 0; r + 1 < rows; r++)
    for (let c = 0; c + 1 < cols; c++) {
      const k = r * cols + c;
      pts.length = 0;
      // around the cell: top, right, bottom, left
      if (!Number.isNaN(hx[k])) pts.push(hx[k], ys[r]);
      if (!Number.isNaN(vy[k + 1])) pts.push(xs[c + 1], vy[k + 1]);
      if (!Number.isNaN(hx[k + cols])) pts.push(hx[k + cols], ys[r + 1]);
      if (!Number.isNaN(vy[k])) pts.push(xs[c], vy[k]);
      if (pts.length === 4) refine(lit, pts[0], pts[1], pts[2], pts[3], 5, chordPx, out);
      else if (pts.length === 8) {
        // a saddle: the cell's centre says whether the lit corners join across it
        const centreLit = lit(0.5 * (xs[c] + xs[c + 1]), 0.5 * (ys[r] + ys[r + 1]));
        if (centreLit === (litAt[k] === 1)) {
          refine(lit, pts[0], pts[1], pts[2], pts[3], 5, chordPx, out); // top–right cuts off the top-right corner
          refine(lit, pts[4], pts[5], pts[6], pts[7], 5, chordPx, out); // bottom–left cuts off the bottom-left corner
        } else {
          refine(lit, pts[0], pts[1], pts[6], pts[7], 5, chordPx, out);
          refine(lit, pts[2], pts[3], pts[4], pts[5], 5, chordPx, out);
        }
      }
    }
  return Float64Array.from(out);
}

/** Splits the chord a–b (both on the edge) at the edge point on its perpendicular bisector while the two depart by more than chordPx. */
function refine(lit: LitTest, ax: number, ay: number, bx: number, by: number, depth: number, chordPx: number, out: number[]): void {
  const len = Math.hypot(bx - ax, by - ay);
  if (depth > 0 && len > 4 * chordPx) {
    const mx = 0.5 * (ax + bx);
    const my = 0.5 * (ay + by);
    const nx = -(by - ay) / len;
    const ny = (bx - ax) / len;
    const s = lit(mx, my);
    // an arc through a and b that is less than a half circle stays within len/2 of the chord's middle
    const reach = 0.5 * len;
    for (const sign of [1, -1]) {
      const ex = mx + sign * reach * nx;
      const ey = my + sign * reach * ny;
      if (lit(ex, ey) === s) continue;
      const t = bisect(lit, mx, my, s, ex, ey) * reach;
      if (t <= chordPx) break;
      const qx = mx + sign * t * nx;
      const qy = my + sign * t * ny;
      refine(lit, ax, ay, qx, qy, depth - 1, chordPx, out);
      refine(lit, qx, qy, bx, by, depth - 1, chordPx, out);
      return;
    }
  }
  out.push(ax, ay, bx, by);
}

export interface RampOptions {
  /** Smallest ramp half-width, projector pixels (the cell diagonal for a mesh, half a pixel's diagonal per pixel). */
  minHalfWidth: number;
  /** Full ramp width wanted on the dome, radians (the feather); 0 = the narrowest ramp. */
  featherRad: number;
  /**
   * Dome angle per projector pixel across the edge at (x, y), a point of the edge with unit normal
   * (nx, ny), radians per pixel; needed only with a feather. Infinite or NaN where the map's slope has
   * no bound (the silhouette).
   */
  angularScale?: (x: number, y: number, nx: number, ny: number) => number;
}

/**
 * The mask ramp at every point of the separable grid (xs × ys) given its lit state: 0.5 + d / (2h)
 * clamped to [0, 1] with d the signed distance to an edge segment (positive inside) and h that
 * segment's half-width — the larger of the smallest half-width and half the feather in projector
 * pixels there — taking the segment with the least d / h (the nearest, when h is the same for all).
 * Points farther than h from every segment get their lit state, 0 or 1.
 */
export function edgeRamp(segments: Float64Array, xs: ArrayLike<number>, ys: ArrayLike<number>, litAt: Uint8Array, o: RampOptions): Float32Array {
  const cols = xs.length;
  const rows = ys.length;
  const n = cols * rows;
  // the least (distance / half-width)² over the segments: continuous across the frame, so the ramp has
  // no steps where the nearest segment changes and its half-width with it
  const best = new Float64Array(n).fill(Infinity);
  const x0 = xs[0];
  const y0 = ys[0];
  const cw = (xs[cols - 1] - x0) / (cols - 1);
  const ch = (ys[rows - 1] - y0) / (rows - 1);
  const span = Math.max(xs[cols - 1] - x0, ys[rows - 1] - y0);
  for (let s = 0; s < segments.length; s += 4) {
    const ax = segments[s];
    const ay = segments[s + 1];
    const bx = segments[s + 2];
    const by = segments[s + 3];
    let h = o.minHalfWidth;
    if (o.featherRad > 0 && o.angularScale) {
      const len = Math.hypot(bx - ax, by - ay);
      const scale = len > 0 ? o.angularScale(0.5 * (ax + bx), 0.5 * (ay + by), -(by - ay) / len, (bx - ax) / len) : Number.NaN;
      // the feather in projector pixels there; none where the slope has no bound
      if (scale > 0 && Number.isFinite(scale)) h = Math.max(h, Math.min(0.25 * span, (0.5 * o.featherRad) / scale));
    }
    const c0 = Math.max(0, Math.ceil((Math.min(ax, bx) - h - x0) / cw));
    const c1 = Math.min(cols - 1, Math.floor((Math.max(ax, bx) + h - x0) / cw));
    const r0 = Math.max(0, Math.ceil((Math.min(ay, by) - h - y0) / ch));
    const r1 = Math.min(rows - 1, Math.floor((Math.max(ay, by) + h - y0) / ch));
    const ex = bx - ax;
    const ey = by - ay;
    const ee = ex * ex + ey * ey;
    for (let r = r0; r <= r1; r++)
      for (let c = c0; c <= c1; c++) {
        const px = xs[c] - ax;
        const py = ys[r] - ay;
        let t = ee > 0 ? (px * ex + py * ey) / ee : 0;
        t = t < 0 ? 0 : t > 1 ? 1 : t;
        const dx = px - t * ex;
        const dy = py - t * ey;
        const q = (dx * dx + dy * dy) / (h * h);
        const k = r * cols + c;
        if (q < best[k]) best[k] = q;
      }
  }
  const mask = new Float32Array(n);
  for (let k = 0; k < n; k++) {
    if (!(best[k] < 1)) {
      mask[k] = litAt[k];
      continue;
    }
    const t = Math.sqrt(best[k]);
    mask[k] = 0.5 + (litAt[k] ? 0.5 * t : -0.5 * t);
  }
  return mask;
}

/** Dome angle per projector pixel across the edge, measured just inside it (see {@link RampOptions}). */
export function angularScaleAt(tracer: Tracer, lit: LitTest): (x: number, y: number, nx: number, ny: number) => number {
  return (x, y, nx, ny) => {
    // across, not along: the slope along the edge can be far smaller than across it (the silhouette)
    const s = lit(x + 0.5 * nx, y + 0.5 * ny) ? 1 : lit(x - 0.5 * nx, y - 0.5 * ny) ? -1 : 0;
    if (s === 0) return Number.NaN;
    const p = tracer.pixel(x + 0.5 * s * nx, y + 0.5 * s * ny);
    const q = tracer.pixel(x + 1.5 * s * nx, y + 1.5 * s * ny);
    if (!('direction' in p) || !('direction' in q)) return Number.NaN;
    const c = p.direction[0] * q.direction[0] + p.direction[1] * q.direction[1] + p.direction[2] * q.direction[2];
    return Math.acos(c > 1 ? 1 : c < -1 ? -1 : c);
  };
}

export interface EdgePlacement {
  /** Points measured along the edge a player draws (about one per projector pixel of edge). */
  samples: number;
  /** Distance from the drawn edge to the exact one along the drawn edge's normal, projector pixels. */
  mean: number;
  p99: number;
  max: number;
  /** The sample farthest from the exact edge, projector pixels. */
  worstAt: [number, number];
}

/**
 * How far the edge a player draws lies from the exact edge: the 0.5 level of the mask interpolated
 * linearly over the two triangles per cell a GPU draws (split top-left to bottom-right, as the .glb's
 * index buffer does), sampled about once per projector pixel along its length; from each sample the
 * exact edge is sought along the drawn edge's normal, toward the other lit state, up to `reach` pixels
 * (a sample that finds none counts as `reach`).
 */
export function measureEdgePlacement(lit: LitTest, mesh: Pick<WarpMesh, 'cols' | 'rows' | 'width' | 'height' | 'mask'>, reach?: number): EdgePlacement {
  const { cols, rows, width: W, height: H, mask } = mesh;
  const cw = W / (cols - 1);
  const ch = H / (rows - 1);
  const R = reach ?? 4 * Math.hypot(cw, ch);
  const dists: number[] = [];
  let max = 0;
  let worstAt: [number, number] = [0, 0];
  const tri = [
    [0, 0, 0, 1, 1, 1], // (tl, bl, br)
    [0, 0, 1, 1, 1, 0], // (tl, br, tr)
  ];
  const px = [0, 0, 0];
  const py = [0, 0, 0];
  const pm = [0, 0, 0];
  for (let r = 0; r + 1 < rows; r++)
    for (let c = 0; c + 1 < cols; c++) {
      for (const t of tri) {
        let above = 0;
        for (let i = 0; i < 3; i++) {
          const cc = c + t[2 * i];
          const rr = r + t[2 * i + 1];
          px[i] = cc * cw;
          py[i] = rr * ch;
          pm[i] = mask[rr * cols + cc];
          if (pm[i] >= 0.5) above++;
        }
        if (above === 0 || above === 3) continue;
        // the 0.5 level crosses the two sides whose ends lie on either side of it
        const ends: number[] = [];
        for (let i = 0; i < 3; i++) {
          const j = (i + 1) % 3;
          if (pm[i] >= 0.5 === pm[j] >= 0.5) continue;
          const f = (0.5 - pm[i]) / (pm[j] - pm[i]);
          ends.push(px[i] + f * (px[j] - px[i]), py[i] + f * (py[j] - py[i]));
        }
        // the mask's gradient over the triangle, pointing inward
        const e1x = px[1] - px[0], e1y = py[1] - py[0], e2x = px[2] - px[0], e2y = py[2] - py[0];
        const d1 = pm[1] - pm[0], d2 = pm[2] - pm[0];
        const det = e1x * e2y - e2x * e1y;
        let gx = (d1 * e2y - d2 * e1y) / det;
        let gy = (d2 * e1x - d1 * e2x) / det;
        const gl = Math.hypot(gx, gy);
        if (!(gl > 0)) continue;
        gx /= gl;
        gy /= gl;
        const len = Math.hypot(ends[2] - ends[0], ends[3] - ends[1]);
        const ns = Math.max(1, Math.round(len));
        for (let s = 0; s < ns; s++) {
          const f = (s + 0.5) / ns;
          const qx = ends[0] + f * (ends[2] - ends[0]);
          const qy = ends[1] + f * (ends[3] - ends[1]);
          const d = distanceAlong(lit, qx, qy, gx, gy, R);
          if (d > max) {
            max = d;
            worstAt = [qx, qy];
          }
          dists.push(d);
        }
      }
    }
  if (dists.length === 0) return { samples: 0, mean: 0, p99: 0, max: 0, worstAt };
  let sum = 0;
  for (const d of dists) sum += d;
  return { samples: dists.length, mean: sum / dists.length, p99: quantile(dists, 0.99), max, worstAt };
}

/** Distance from (x, y) to where the lit state changes along ±(gx, gy) (toward the other state), at most R. */
function distanceAlong(lit: LitTest, x: number, y: number, gx: number, gy: number, R: number): number {
  const s = lit(x, y);
  // lit: the edge lies outward, down the mask's slope
  const dx = s ? -gx : gx;
  const dy = s ? -gy : gy;
  let lo = 0;
  for (let t = 0.125; lo < R; t *= 2) {
    const hi = Math.min(t, R);
    if (lit(x + hi * dx, y + hi * dy) !== s) return lo + bisect(lit, x + lo * dx, y + lo * dy, s, x + hi * dx, y + hi * dy) * (hi - lo);
    lo = hi;
  }
  return R;
}
