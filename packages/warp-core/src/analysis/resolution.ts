/**
 * Resolution on the dome: the angle one projector pixel covers, seen from the content's eye, in
 * arcminutes per projector pixel — the square root of the pixel's solid angle (its geometric-mean
 * width), and its longest and shortest widths (the pixel is stretched into an ellipse-like patch).
 */
import { azAltFromDirection, RAD, type Vec3 } from '../math.js';
import type { Tracer } from '../trace.js';
import type { CellMeasures, FrameSample } from './sample.js';
import { roundFigure as r, Sorted } from './stats.js';

export const ARCMIN_PER_RADIAN = RAD * 60;

export interface PixelResolution {
  /** √(solid angle of one pixel), arcminutes. */
  arcmin: number;
  /** Widths of the pixel's footprint along its longest and shortest directions, arcminutes. */
  major: number;
  minor: number;
}

/**
 * Arcminutes per projector pixel at pixel coordinate (x, y), from central differences of the eye's
 * direction (step h pixels): the Jacobian J of pixel → unit direction; √|J_x × J_y| and the singular
 * values of J. Null when a neighbour misses the mirror.
 */
export function pixelResolution(tracer: Tracer, x: number, y: number, h = 0.05): PixelResolution | null {
  const d = (px: number, py: number): Vec3 | null => {
    const t = tracer.pixel(px, py);
    return t.kind === 'mirror-miss' || t.kind === 'open' ? null : t.direction;
  };
  const xm = d(x - h, y), xp = d(x + h, y), ym = d(x, y - h), yp = d(x, y + h);
  if (!xm || !xp || !ym || !yp) return null;
  const jx = [0, 1, 2].map((a) => (xp[a] - xm[a]) / (2 * h));
  const jy = [0, 1, 2].map((a) => (yp[a] - ym[a]) / (2 * h));
  const cx = jx[1] * jy[2] - jx[2] * jy[1];
  const cy = jx[2] * jy[0] - jx[0] * jy[2];
  const cz = jx[0] * jy[1] - jx[1] * jy[0];
  const area = Math.sqrt(cx * cx + cy * cy + cz * cz);
  // singular values of J from the 2×2 metric G = JᵀJ
  const a = jx[0] * jx[0] + jx[1] * jx[1] + jx[2] * jx[2];
  const c = jy[0] * jy[0] + jy[1] * jy[1] + jy[2] * jy[2];
  const b = jx[0] * jy[0] + jx[1] * jy[1] + jx[2] * jy[2];
  const tr = (a + c) / 2;
  const disc = Math.sqrt(Math.max(0, ((a - c) / 2) ** 2 + b * b));
  return {
    arcmin: Math.sqrt(area) * ARCMIN_PER_RADIAN,
    major: Math.sqrt(tr + disc) * ARCMIN_PER_RADIAN,
    minor: Math.sqrt(Math.max(0, tr - disc)) * ARCMIN_PER_RADIAN,
  };
}

export interface ResolutionFigures {
  unit: 'arcmin per projector pixel';
  median: number | null;
  p5: number | null;
  p95: number | null;
  /** The coarsest lit cell: its figure, where it is on the dome, and its projector pixel. */
  worst: { arcmin: number | null; azimuth: number | null; altitude: number | null; pixel: [number, number] } | null;
  /** Medians by altitude band on the dome (degrees). */
  byAltitude: { from: number; to: number; median: number | null; share: number | null }[];
  /** The figure if every projector pixel fell evenly on the content's dome: the best a rig could do. */
  ideal: number;
}

/** Per full lit cell: arcminutes per pixel (NaN elsewhere). */
export function cellArcmin(cells: CellMeasures): Float64Array {
  return Float64Array.from(cells.omegaPerPixel, (w) => (Number.isFinite(w) ? Math.sqrt(w) * ARCMIN_PER_RADIAN : Number.NaN));
}

/** Direction (from the eye) at a cell's centre: the normalized mean of its corners' directions. */
export function cellDirection(s: FrameSample, i: number, j: number): Vec3 {
  const k = j * s.cols + i;
  const ks = [k, k + 1, k + s.cols, k + s.cols + 1];
  const v: Vec3 = [0, 0, 0];
  for (const q of ks) for (let a = 0; a < 3; a++) v[a] += s.dir[3 * q + a];
  const l = Math.hypot(v[0], v[1], v[2]);
  return [v[0] / l, v[1] / l, v[2] / l];
}

export function resolutionFigures(s: FrameSample, cells: CellMeasures, arcmin: Float64Array, contentOmega: number): ResolutionFigures {
  const sorted = new Sorted(arcmin);
  const nc = s.cols - 1;
  let worstC = -1;
  for (let c = 0; c < arcmin.length; c++) if (Number.isFinite(arcmin[c]) && (worstC < 0 || arcmin[c] > arcmin[worstC])) worstC = c;
  let worst: ResolutionFigures['worst'] = null;
  const cellAlt = new Float64Array(arcmin.length).fill(Number.NaN);
  for (let c = 0; c < arcmin.length; c++) {
    if (!Number.isFinite(arcmin[c])) continue;
    const d = cellDirection(s, c % nc, Math.floor(c / nc));
    cellAlt[c] = azAltFromDirection(d)[1] * RAD;
  }
  if (worstC >= 0) {
    const i = worstC % nc;
    const j = Math.floor(worstC / nc);
    const [az, alt] = azAltFromDirection(cellDirection(s, i, j));
    worst = { arcmin: r(arcmin[worstC], 3), azimuth: r(az * RAD, 2), altitude: r(alt * RAD, 2), pixel: [Math.round((s.xs[i] + s.xs[i + 1]) / 2), Math.round((s.ys[j] + s.ys[j + 1]) / 2)] };
  }
  const bands: [number, number][] = [[0, 15], [15, 45], [45, 75], [75, 90.0001]];
  const byAltitude = bands.map(([from, to]) => {
    const b = new Sorted(arcmin, (c) => cellAlt[c] >= from && cellAlt[c] < to);
    return { from, to: Math.min(90, to), median: r(b.q(0.5), 3), share: sorted.count ? r(b.count / sorted.count, 4) : null };
  });
  const [W, H] = s.tracer.rig.projector.resolution;
  return {
    unit: 'arcmin per projector pixel',
    median: r(sorted.q(0.5), 3),
    p5: r(sorted.q(0.05), 3),
    p95: r(sorted.q(0.95), 3),
    worst,
    byAltitude,
    ideal: r(Math.sqrt(contentOmega / (W * H)) * ARCMIN_PER_RADIAN, 3)!,
  };
}
