/**
 * A warp grid in the "fill layout" of VESA MPCDI 2.0 §3.6 (as DESIGN.md "The warp mesh and its files"
 * records it): the top left of the first sample is the top left of the region and the bottom right of
 * the last sample its bottom right, so sample (i, j) of an N × M grid stands at
 * ((i + 0.5)/N, (j + 0.5)/M) of the region — where a GPU sampling the grid as a texture takes texel
 * (i, j) whole. Not skyfold's own corner-to-corner mesh, which the README defines for its own formats.
 */
import type { Rig } from '../rig/model.js';
import { Tracer, allocGridOutput, landsOnDome } from '../trace.js';
import { interpolateCell } from './bake.js';
import type { WarpMesh } from './mesh.js';

export interface FillLayoutGrid {
  cols: number;
  rows: number;
  /**
   * Three values per sample, the first row at the top (§3.6.1): absolute normalized source (fisheye)
   * coordinates u, v (§3.6.2) and an error estimate, 0 = none given; where there is no data (the light
   * misses the mirror or, on an as-built dome, meets no surface) u = v = NaN and the error is 1.
   */
  data: Float32Array;
}

/** Where sample (i, j) of an N × M fill-layout grid stands, in pixels of a W × H region. */
export function fillSamplePosition(i: number, j: number, N: number, M: number, W: number, H: number): [number, number] {
  return [((i + 0.5) * W) / N, ((j + 0.5) * H) / M];
}

/** Traces the rig's projector at the sample positions of an N × M fill-layout grid. */
export function fillLayoutFromRig(rig: Rig, cols: number, rows: number): FillLayoutGrid {
  const tracer = new Tracer(rig);
  const { width: W, height: H } = tracer.frame;
  const xs = Float64Array.from({ length: cols }, (_, i) => ((i + 0.5) * W) / cols);
  const ys = Float64Array.from({ length: rows }, (_, j) => ((j + 0.5) * H) / rows);
  const g = tracer.grid(xs, ys, allocGridOutput(cols, rows));
  const data = new Float32Array(cols * rows * 3);
  for (let k = 0; k < cols * rows; k++) {
    const has = landsOnDome(g.kind[k]);
    data[3 * k] = has ? g.u[k] : Number.NaN;
    data[3 * k + 1] = has ? g.v[k] : Number.NaN;
    data[3 * k + 2] = has ? 0 : 1;
  }
  return { cols, rows, data };
}

/**
 * Resamples a corner-to-corner mesh at the positions of a fill-layout grid of the same size, over the
 * two triangles per cell a GPU draws; no-data samples where every vertex of the cell is unlit (mask 0).
 * For meshes whose rig is not at hand; the bake traces the samples exactly instead.
 */
export function fillLayoutFromMesh(mesh: WarpMesh): FillLayoutGrid {
  const { cols, rows } = mesh;
  const data = new Float32Array(cols * rows * 3);
  for (let j = 0; j < rows; j++)
    for (let i = 0; i < cols; i++) {
      // sample (i, j) in the mesh's cell units: (i + 0.5)/cols of the frame = (i + 0.5)(cols − 1)/cols cells
      const gx = ((i + 0.5) * (cols - 1)) / cols;
      const gy = ((j + 0.5) * (rows - 1)) / rows;
      const c = Math.min(cols - 2, Math.floor(gx));
      const r = Math.min(rows - 2, Math.floor(gy));
      const k00 = r * cols + c;
      const k = 3 * (j * cols + i);
      const m = mesh.mask;
      if (m[k00] === 0 && m[k00 + 1] === 0 && m[k00 + cols] === 0 && m[k00 + cols + 1] === 0) {
        data[k] = data[k + 1] = Number.NaN;
        data[k + 2] = 1;
        continue;
      }
      data[k] = interpolateCell(mesh.u, k00, cols, gx - c, gy - r, true);
      data[k + 1] = interpolateCell(mesh.v, k00, cols, gx - c, gy - r, true);
      data[k + 2] = 0;
    }
  return { cols, rows, data };
}
