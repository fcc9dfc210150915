/**
 * What the audience sees: for every dome-master pixel, the projector pixel that lights that
 * direction (the inverse trace), and how bright the light lands there. As a RemapMap from the warped
 * projector frame to an N × N dome master.
 */
import { contentToWorld, fisheyeToDirection } from './optics/fisheye.js';
import { azAltFromDirection } from './math.js';
import { domeAreaOnGrid, referenceArea } from './mesh/grid-samples.js';
import type { RemapMap } from './remap/types.js';
import type { Rig } from './rig/model.js';
import { locateDirection } from './locate.js';
import { Tracer } from './trace.js';

export interface SimulateOptions {
  /**
   * 'physical': the light per dome area of the projector pixel (1/A, relative to the reference
   * area A_max, so a fully compensated warp shows its content unchanged); 'none': geometry only.
   */
  brightness: 'physical' | 'none';
  /** Called after each row of the dome master with the rows done and the rows in all (for progress). */
  onRow?: (done: number, total: number) => void;
}

/** The map from the projector frame (source, pixel units) to an N × N dome master of what is seen. */
export function simulationMap(rig: Rig, size: number, options: SimulateOptions = { brightness: 'physical' }): RemapMap {
  const tracer = new Tracer(rig);
  const n = size * size;
  const x = new Float32Array(n).fill(Number.NaN);
  const y = new Float32Array(n).fill(Number.NaN);
  const gain = new Float32Array(n);
  const d: [number, number, number] = [0, 0, 0];
  const fov = rig.content.fov;
  for (let j = 0; j < size; j++) {
    for (let i = 0; i < size; i++) {
      const u = (i + 0.5) / size;
      const v = (j + 0.5) / size;
      if ((u - 0.5) ** 2 + (v - 0.5) ** 2 > 0.25) continue;
      contentToWorld(d, fisheyeToDirection(d, u, v, fov), rig.content.azimuth ?? 0);
      const [az, alt] = azAltFromDirection(d);
      const r = locateDirection(tracer, az, alt, 1e-6);
      if (!r.pixel) continue;
      const k = j * size + i;
      x[k] = r.pixel[0];
      y[k] = r.pixel[1];
      gain[k] = 1;
    }
    options.onRow?.(j + 1, size);
  }
  if (options.brightness === 'physical') {
    const areaMax = referenceArea(tracer);
    // the dome area per projector pixel on a grid every `step` pixels, interpolated at each located pixel
    const step = 2;
    const { width: W, height: H } = tracer.frame;
    const nx = Math.ceil(W / step) + 1;
    const ny = Math.ceil(H / step) + 1;
    const xs = Float64Array.from({ length: nx }, (_, i) => Math.min(W, i * step));
    const ys = Float64Array.from({ length: ny }, (_, j) => Math.min(H, j * step));
    const area = domeAreaOnGrid(tracer, xs, ys);
    for (let k = 0; k < n; k++) {
      if (!(gain[k] > 0)) continue;
      const gx = Math.min(nx - 1.000001, x[k] / step);
      const gy = Math.min(ny - 1.000001, y[k] / step);
      const i0 = Math.floor(gx);
      const j0 = Math.floor(gy);
      const fx = gx - i0;
      const fy = gy - j0;
      // weighted over the finite corners (the lit edge has unlit neighbours)
      let sum = 0;
      let wsum = 0;
      for (let c = 0; c < 4; c++) {
        const di = c & 1;
        const dj = c >> 1;
        const a = area[(j0 + dj) * nx + i0 + di];
        const w = (di ? fx : 1 - fx) * (dj ? fy : 1 - fy);
        if (Number.isFinite(a) && a > 0 && w > 0) {
          sum += w * a;
          wsum += w;
        }
      }
      gain[k] = wsum > 0 ? areaMax / (sum / wsum) : 1;
    }
  }
  return { width: size, height: size, x, y, gain };
}
