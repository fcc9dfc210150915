/**
 * Values sampled over the projector frame on separable grids: the dome area each pixel lights (for
 * brightness), the brightness factor, what the content holds, and the filling of unlit points.
 */
import { allocGridOutput, type GridOutput, type Tracer, landsOnDome } from '../trace.js';

/** Rows of the grid traced at a time by domeAreaOnGrid: five traces of a band stay a few MiB. */
const AREA_BAND_ROWS = 32;

/**
 * Dome area lit per unit of projector pixel area, at each point of the separable grid (xs, ys): the
 * length of ∂D/∂x × ∂D/∂y, the dome point D differenced over ±h pixels. Traced in bands of rows, so
 * memory stays small at any grid size; each value is the same as from one trace of the whole grid.
 */
export function domeAreaOnGrid(tracer: Tracer, xs: ArrayLike<number>, ys: ArrayLike<number>, h = 0.25): Float64Array {
  const nx = xs.length;
  const ny = ys.length;
  const shift = (a: ArrayLike<number>, d: number) => Float64Array.from(a as ArrayLike<number>, (x) => x + d);
  const xm = shift(xs, -h);
  const xp = shift(xs, +h);
  const band = Math.min(ny, AREA_BAND_ROWS);
  const o = { points: true };
  const grids = [0, 1, 2, 3, 4].map(() => allocGridOutput(nx, band, o));
  const area = new Float64Array(nx * ny);
  const dx = [0, 0, 0];
  const dy = [0, 0, 0];
  for (let j0 = 0; j0 < ny; j0 += band) {
    const rows = Math.min(band, ny - j0);
    const yb = Float64Array.from({ length: rows }, (_, j) => ys[j0 + j]);
    // a short last band reuses the buffers: grid() fills only the first rows·nx entries
    const c = tracer.grid(xs, yb, grids[0]);
    const gxm = tracer.grid(xm, yb, grids[1]);
    const gxp = tracer.grid(xp, yb, grids[2]);
    const gym = tracer.grid(xs, shift(yb, -h), grids[3]);
    const gyp = tracer.grid(xs, shift(yb, +h), grids[4]);
    for (let kb = 0, k = j0 * nx; kb < rows * nx; kb++, k++) {
      if (!landsOnDome(c.kind[kb])) {
        area[k] = Number.NaN;
        continue;
      }
      if (!difference(dx, c, gxm, gxp, kb, h) || !difference(dy, c, gym, gyp, kb, h)) {
        area[k] = Number.NaN;
        continue;
      }
      // |∂D/∂x × ∂D/∂y|: the dome area of one projector pixel there
      const cx = dx[1] * dy[2] - dx[2] * dy[1];
      const cy = dx[2] * dy[0] - dx[0] * dy[2];
      const cz = dx[0] * dy[1] - dx[1] * dy[0];
      area[k] = Math.sqrt(cx * cx + cy * cy + cz * cz);
    }
  }
  return area;
}

/** Central difference of the dome point, one-sided where a neighbour misses the mirror. */
function difference(out: number[], c: GridOutput, m: GridOutput, p: GridOutput, k: number, h: number): boolean {
  const P = c.point!;
  const hasM = landsOnDome(m.kind[k]);
  const hasP = landsOnDome(p.kind[k]);
  const Pm = m.point!;
  const Pp = p.point!;
  for (let a = 0; a < 3; a++) {
    if (hasM && hasP) out[a] = (Pp[3 * k + a] - Pm[3 * k + a]) / (2 * h);
    else if (hasP) out[a] = (Pp[3 * k + a] - P[3 * k + a]) / h;
    else if (hasM) out[a] = (P[3 * k + a] - Pm[3 * k + a]) / h;
    else return false;
  }
  return true;
}

/** The q-quantile (0..1) of the finite values of a, by sorting a copy. */
export function quantile(a: ArrayLike<number>, q: number): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) if (Number.isFinite(a[i])) m++;
  if (m === 0) return Number.NaN;
  const v = new Float64Array(m);
  m = 0;
  for (let i = 0; i < a.length; i++) if (Number.isFinite(a[i])) v[m++] = a[i];
  v.sort(); // typed arrays sort numerically
  const pos = Math.min(v.length - 1, Math.max(0, q * (v.length - 1)));
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return v[lo] + (v[hi] - v[lo]) * (pos - lo);
}

export interface BrightnessOptions {
  /** Strength s in [0, 1]: 0 = no compensation, 1 = full. */
  strength: number;
  /** Lowest factor allowed, so no region goes black. */
  floor: number;
}

/**
 * The area reference A_max of DESIGN.md "Brightness": a high percentile of the lit area over the
 * frame, sampled on a fixed grid (every `step` pixels) so meshes and per-pixel maps agree.
 */
export function referenceArea(tracer: Tracer, percentile = 0.99, step = 4): number {
  const W = tracer.frame.width;
  const H = tracer.frame.height;
  const xs = Float64Array.from({ length: Math.ceil(W / step) }, (_, i) => Math.min(W - 0.5, i * step + step / 2));
  const ys = Float64Array.from({ length: Math.ceil(H / step) }, (_, j) => Math.min(H - 0.5, j * step + step / 2));
  const g = tracer.grid(xs, ys, allocGridOutput(xs.length, ys.length));
  const area = domeAreaOnGrid(tracer, xs, ys);
  const used: number[] = [];
  for (let k = 0; k < area.length; k++) if (contentVisible(tracer, g.u[k], g.v[k], g.kind[k]) && Number.isFinite(area[k])) used.push(area[k]);
  return quantile(used, percentile);
}

/** b = (A / A_max)^s clipped to [floor, 1]: the brightest (smallest) patches are dimmed toward the dimmest. */
export function brightnessFactor(area: number, areaMax: number, o: BrightnessOptions): number {
  if (!Number.isFinite(area) || !(areaMax > 0)) return 1;
  const b = Math.pow(area / areaMax, o.strength);
  return b < o.floor ? o.floor : b > 1 ? 1 : b;
}

/** True when the content holds this point: it reached the mirror and lies within the content's fov. */
export function contentVisible(tracer: Tracer, u: number, v: number, kind: number): boolean {
  if (!landsOnDome(kind)) return false;
  const du = u - 0.5;
  const dv = v - 0.5;
  return du * du + dv * dv <= 0.25 + 1e-12;
}

/** The points of the 3 × 3 block centred on grid point k that lie inside the cols × rows grid, row by row, into `out`; returns how many. */
function around(k: number, cols: number, rows: number, out: Int32Array): number {
  const i = k % cols;
  const j = (k - i) / cols;
  let count = 0;
  for (let jj = j - 1; jj <= j + 1; jj++)
    for (let ii = i - 1; ii <= i + 1; ii++) if (ii >= 0 && jj >= 0 && ii < cols && jj < rows) out[count++] = jj * cols + ii;
  return count;
}

/**
 * Gives unlit grid points finite values (u, v, brightness) by repeatedly averaging lit (or already filled) neighbours, so
 * a GPU interpolating across a cell at the edge samples nearby content instead of junk.
 */
export function fillUnlit(cols: number, rows: number, known: Uint8Array, ...arrays: (Float32Array | Float64Array)[]): void {
  const n = cols * rows;
  const have = Uint8Array.from(known);
  if (!have.some((x) => x === 1)) {
    for (const f of arrays) f.fill(0.5);
    return;
  }
  // Layer by layer outwards from the lit points (breadth first): each layer is the unfilled points
  // next to the ones filled before it, averaged from those, so the work is linear in the grid.
  const queued = Uint8Array.from(have);
  let layer: number[] = [];
  const near = new Int32Array(9);
  const enqueueAround = (k: number, into: number[]) => {
    for (let a = 0, count = around(k, cols, rows, near); a < count; a++) {
      const m = near[a];
      if (!queued[m]) {
        queued[m] = 1;
        into.push(m);
      }
    }
  };
  for (let k = 0; k < n; k++) if (have[k]) enqueueAround(k, layer);
  const F = arrays.length;
  while (layer.length > 0) {
    const vals = new Float64Array(layer.length * F);
    for (let q = 0; q < layer.length; q++) {
      let c = 0;
      for (let a = 0, count = around(layer[q], cols, rows, near); a < count; a++) {
        const m = near[a];
        if (have[m]) {
          for (let f = 0; f < F; f++) vals[q * F + f] += arrays[f][m];
          c++;
        }
      }
      for (let f = 0; f < F; f++) vals[q * F + f] /= c;
    }
    const next: number[] = [];
    for (let q = 0; q < layer.length; q++) {
      const k = layer[q];
      for (let f = 0; f < F; f++) arrays[f][k] = vals[q * F + f];
      have[k] = 1;
    }
    for (const k of layer) enqueueAround(k, next);
    layer = next;
  }
}
