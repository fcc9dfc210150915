/**
 * What the audience sees: for every dome-master pixel, the projector pixel that lights that
 * direction (the inverse trace), and how bright the light lands there. As a RemapMap from the warped
 * projector frame to an N × N dome master.
 */
import { fisheyeToDirection } from './fisheye.js';
import { azAltFromDirection } from './math.js';
import { domeAreaOnGrid, referenceArea } from './mesh/field.js';
import type { RemapMap } from './remap/types.js';
import type { Rig } from './rig.js';
import { locateDirection } from './locate.js';
import { Tracer } from './trace.js';

export interface SimulateOptions {
  /**
   * 'physical': the light per dome area of the projector pixel (1/A, relative to the reference
   * area A_max, so a fully compensated warp shows its content unchanged); 'none': geometry only.
   */
  brightness: 'physical' | 'none';
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
      fisheyeToDirection(d, u, v, fov);
      const [az, alt] = azAltFromDirection(d);
      const r = locateDirection(tracer, az, alt, 1e-6);
      if (!r.pixel) continue;
      const k = j * size + i;
      x[k] = r.pixel[0];
      y[k] = r.pixel[1];
      gain[k] = 1;
    }
  }
  if (options.brightness === 'physical') {
    const areaMax = referenceArea(tracer);
    // area at each located pixel: evaluated in rows of points to use the grid tracer
    const xs = new Float64Array(1);
    const ys = new Float64Array(1);
    for (let k = 0; k < n; k++) {
      if (!(gain[k] > 0)) continue;
      xs[0] = x[k];
      ys[0] = y[k];
      const a = domeAreaOnGrid(tracer, xs, ys)[0];
      gain[k] = Number.isFinite(a) && a > 0 ? areaMax / a : 1;
    }
  }
  return { width: size, height: size, x, y, gain };
}
