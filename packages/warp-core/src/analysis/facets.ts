/**
 * How far the sphere model would misplace content on an as-built dome: for lit projector pixels, the
 * angle (seen from the content's eye) between where the light truly lands on the mesh and where a trace
 * against the nominal sphere of `dome.radius` puts it. Median and worst, in degrees and in pixels of a
 * 4096-pixel dome master (the angular fisheye maps fov/2 to half the master's width).
 */
import type { Rig } from '../rig/model.js';
import { allocGridOutput, HitKind, Tracer } from '../trace.js';
import { RAD } from '../math.js';
import { roundFigure as r } from './stats.js';

export interface FacetFigures {
  /** Lit samples compared (light on the dome above the springline in both models). */
  samples: number;
  /** Degrees. */
  medianDegrees: number | null;
  worstDegrees: number | null;
  /** The same in pixels of a `masterSize` dome master. */
  medianMasterPx: number | null;
  worstMasterPx: number | null;
  masterSize: number;
}

/** Null for a rig on the nominal sphere. `cols` × about `cols`·H/W pixel centres are compared. */
export function facetFigures(rig: Rig, cols = 320, masterSize = 4096): FacetFigures | null {
  if (!rig.dome.mesh) return null;
  const mesh = new Tracer(rig);
  const sphere = new Tracer({ ...rig, dome: { ...rig.dome, mesh: undefined } });
  const [W, H] = rig.projector.resolution;
  const rows = Math.max(2, Math.round((cols * H) / W));
  const xs = Array.from({ length: cols }, (_, i) => ((i + 0.5) * W) / cols);
  const ys = Array.from({ length: rows }, (_, j) => ((j + 0.5) * H) / rows);
  const a = mesh.grid(xs, ys, allocGridOutput(cols, rows, { points: true }));
  const b = sphere.grid(xs, ys, allocGridOutput(cols, rows, { points: true }));
  const e = rig.content.eye;
  const angles: number[] = [];
  for (let k = 0; k < cols * rows; k++) {
    if (a.kind[k] !== HitKind.Dome || b.kind[k] !== HitKind.Dome) continue;
    const p = a.point!;
    const q = b.point!;
    const ux = p[3 * k] - e[0], uy = p[3 * k + 1] - e[1], uz = p[3 * k + 2] - e[2];
    const vx = q[3 * k] - e[0], vy = q[3 * k + 1] - e[1], vz = q[3 * k + 2] - e[2];
    // the angle between two directions by atan2(|u × v|, u · v): exact at small angles too
    const cx = uy * vz - uz * vy, cy = uz * vx - ux * vz, cz = ux * vy - uy * vx;
    angles.push(Math.atan2(Math.hypot(cx, cy, cz), ux * vx + uy * vy + uz * vz));
  }
  angles.sort((x, y) => x - y);
  const n = angles.length;
  const pxPerRad = masterSize / 2 / (rig.content.fov / 2);
  const median = n ? angles[Math.floor(n / 2)] : null;
  const worst = n ? angles[n - 1] : null;
  return {
    samples: n,
    medianDegrees: median === null ? null : r(median * RAD),
    worstDegrees: worst === null ? null : r(worst * RAD),
    medianMasterPx: median === null ? null : r(median * pxPerRad),
    worstMasterPx: worst === null ? null : r(worst * pxPerRad),
    masterSize,
  };
}
