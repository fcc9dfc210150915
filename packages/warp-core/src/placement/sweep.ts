/**
 * The "move the projector back and forth until the picture works" made visible: coverage, resolution and
 * lit share over a grid of projector placements — its distance from the mirror (along the floor, on the
 * line from the mirror through where the projector stands now) and its lens height above the floor —
 * the projector kept aimed at the same point, the mirror where it is. Each cell is scored as the planner
 * scores a candidate (`evaluatePlacement`), so the chart and the plan agree.
 */
import type { Rig } from '../rig/model.js';
import { cloneRig } from '../rig/clone.js';
import { evaluatePlacement, type PlanObjective } from './scoring.js';
import { resolveRoom, type Room } from './room.js';
import { DEFAULT_CLEARANCE, NOMINAL_BODY } from './scoring.js';

export interface SweepOptions {
  /** Grid columns (distances) and rows (heights). */
  distances: number;
  heights: number;
  /** Frame vertices per cell. */
  vertices: number;
  objective: PlanObjective;
}

export const SWEEP_DEFAULTS: Readonly<SweepOptions> = { distances: 13, heights: 9, vertices: 500, objective: 'balanced' };

export interface SweepPoint {
  /** Horizontal distance from the mirror's centre, metres. */
  distance: number;
  /** Lens height above the floor, metres. */
  height: number;
}

export interface PlacementSweep {
  /** Column distances and row heights (metres), ascending. */
  distances: number[];
  heights: number[];
  /** Per cell, row by row (height), then by distance; null where the placement cannot be traced. */
  coverage: (number | null)[];
  arcmin: (number | null)[];
  lit: (number | null)[];
  score: (number | null)[];
  /** True where the placement keeps every bound and the room. */
  allowed: boolean[];
  current: SweepPoint;
  /** The allowed cell with the highest score, if any. */
  bestCell: SweepPoint | null;
  /** Floor height the heights are measured from (world z, metres). */
  floorZ: number;
}

/** Where a rig's projector sits in the sweep's terms. */
export function sweepPoint(rig: Rig, room: Pick<Room, 'floorZ'>): SweepPoint {
  const C = rig.mirror.center;
  const P = rig.projector.position;
  return { distance: Math.hypot(P[0] - C[0], P[1] - C[1]), height: P[2] - room.floorZ };
}

export function sweepPlacement(rig: Rig, options: Partial<SweepOptions> = {}, room?: Room): PlacementSweep {
  const o = { ...SWEEP_DEFAULTS, ...options };
  const used = room ?? resolveRoom(rig, undefined, [], NOMINAL_BODY);
  const C = rig.mirror.center;
  const P = rig.projector.position;
  let ux = P[0] - C[0];
  let uy = P[1] - C[1];
  const ul = Math.hypot(ux, uy);
  if (ul < 1e-9) [ux, uy] = [-C[0], -C[1]];
  const l = Math.hypot(ux, uy) || 1;
  [ux, uy] = [ux / l, uy / l];
  // from just clear of the mirror to the dome's wall along that line
  const R = rig.dome.radius;
  const b = C[0] * ux + C[1] * uy;
  const wall = -b + Math.sqrt(Math.max(0, b * b - (C[0] * C[0] + C[1] * C[1] - R * R)));
  const dLo = rig.mirror.radius + 0.1;
  const dHi = Math.max(dLo + 0.1, wall - 0.05);
  const hLo = Math.max(0.05, used.lensHeight[0]);
  const hHi = Math.max(hLo + 0.1, Math.min(used.lensHeight[1], R - used.floorZ - 0.1));
  const distances = Array.from({ length: o.distances }, (_, i) => dLo + ((dHi - dLo) * i) / (o.distances - 1));
  const heights = Array.from({ length: o.heights }, (_, j) => hLo + ((hHi - hLo) * j) / (o.heights - 1));
  const n = o.distances * o.heights;
  const sweep: PlacementSweep = {
    distances,
    heights,
    coverage: new Array(n).fill(null),
    arcmin: new Array(n).fill(null),
    lit: new Array(n).fill(null),
    score: new Array(n).fill(null),
    allowed: new Array(n).fill(false),
    current: sweepPoint(rig, used),
    bestCell: null,
    floorZ: used.floorZ,
  };
  let bestScore = -Infinity;
  for (let j = 0; j < o.heights; j++)
    for (let i = 0; i < o.distances; i++) {
      const k = j * o.distances + i;
      const candidate = cloneRig(rig);
      candidate.projector.position = [C[0] + distances[i] * ux, C[1] + distances[i] * uy, used.floorZ + heights[j]];
      let e;
      try {
        e = evaluatePlacement(candidate, { objective: o.objective, vertices: o.vertices, depth: 2, clearance: DEFAULT_CLEARANCE, maxShadow: used.maxShadow, minCoverage: 0, room: used });
      } catch {
        continue; // a placement the optics refuse (the lens on the axis it looks along) stays blank
      }
      if (e.figures.coverage === null) {
        // broke a bound before the trace: trace the figures without the room so the chart still shows them
        const free = evaluatePlacement(candidate, { objective: o.objective, vertices: o.vertices, depth: 2, clearance: DEFAULT_CLEARANCE, maxShadow: 1, minCoverage: 0 });
        e = { ...free, violation: Math.max(e.violation, free.violation) };
      }
      sweep.coverage[k] = e.figures.coverage;
      sweep.arcmin[k] = e.figures.median;
      sweep.lit[k] = e.figures.pixelsLit;
      sweep.score[k] = e.figures.score;
      sweep.allowed[k] = e.violation === 0;
      if (e.violation === 0 && (e.figures.score ?? -Infinity) > bestScore) {
        bestScore = e.figures.score!;
        sweep.bestCell = { distance: distances[i], height: heights[j] };
      }
    }
  return sweep;
}
