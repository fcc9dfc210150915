/**
 * The "move the projector back and forth until the picture works" made visible: coverage, resolution and
 * lit share over a grid of projector placements — its distance from the mirror (along the floor, on the
 * line from the mirror through where the projector stands now) and its lens height above the floor —
 * the projector kept aimed at the same point, the mirror where it is. Each cell is scored as the planner
 * scores a candidate (`evaluatePlacement`), so the chart and the plan agree. Where the room (or the plan's
 * `vary` list) lets the mirror's height change, a second grid holds the same figures over the projector's
 * distance and the mirror centre's height, the lens at its current height and aimed at the same spot of
 * the mirror; where the mirror's height is fixed there is no second grid.
 */
import type { Vec3 } from '../math.js';
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
  /** Rows of the mirror-height grid (when the mirror's height is free). */
  mirrorHeights: number;
  /** The fields the plan varies (PLAN_FIELDS names); `mirror.center` or `mirror.center.z` frees the mirror's height. */
  vary: readonly string[];
}

export const SWEEP_DEFAULTS: Readonly<SweepOptions> = { distances: 13, heights: 9, vertices: 500, objective: 'balanced', mirrorHeights: 7, vary: [] };

/** Figures per cell of one grid, row by row, then by distance; null where the placement cannot be traced. */
export interface SweepGrid {
  coverage: (number | null)[];
  arcmin: (number | null)[];
  lit: (number | null)[];
  score: (number | null)[];
  /** True where the placement keeps every bound and the room. */
  allowed: boolean[];
}

/** The grid over the projector's distance (columns) and the mirror centre's height above the floor (rows). */
export interface MirrorHeightSweep extends SweepGrid {
  /** Row heights of the mirror's centre above the floor, metres, ascending. */
  heights: number[];
  /** The current rig: the projector's distance and the mirror centre's height. */
  current: SweepPoint;
  /** The allowed cell with the highest score (its `height` is the mirror's), if any. */
  bestCell: SweepPoint | null;
}

export interface SweepPoint {
  /** Horizontal distance from the mirror's centre, metres. */
  distance: number;
  /** Lens height above the floor, metres. */
  height: number;
}

export interface PlacementSweep extends SweepGrid {
  /** Column distances and row heights (metres), ascending. */
  distances: number[];
  heights: number[];
  current: SweepPoint;
  /** The allowed cell with the highest score, if any. */
  bestCell: SweepPoint | null;
  /** Floor height the heights are measured from (world z, metres). */
  floorZ: number;
  /** The mirror-height grid, or null where the mirror's height is fixed. */
  mirror: MirrorHeightSweep | null;
}

/** How the mirror's centre may move up and down: its lowest and highest height above the floor and the centre at a height. */
export interface MirrorHeightSpan {
  lo: number;
  hi: number;
  centerAt: (height: number) => Vec3;
}

/** Least change of the mirror's height worth a grid, metres (common practice: below a centimetre a mirror is fixed). */
const LEAST_SPAN = 0.01;

/**
 * Whether the mirror's height is free, and how: along a segment that rises at least as much as it runs
 * (the centre moves along it), within a box of some height, or any height when `vary` names the mirror's
 * centre (or its z) and the room does not fix the mirror. Always within the physical bounds (above the
 * floor, inside the dome).
 */
export function mirrorHeightSpan(rig: Rig, room: Room, vary: readonly string[] = []): MirrorHeightSpan | null {
  const place = room.mirror;
  const r = rig.mirror.radius;
  const C = rig.mirror.center;
  const floorZ = room.floorZ;
  let zLo = floorZ + r;
  let zHi = rig.dome.radius - r;
  let centerAt = (h: number): Vec3 => [C[0], C[1], floorZ + h];
  if (place.kind === 'fixed') return null;
  if (place.kind === 'along') {
    const { from, to } = place;
    const rise = to[2] - from[2];
    if (Math.abs(rise) < Math.hypot(to[0] - from[0], to[1] - from[1]) || Math.abs(rise) < LEAST_SPAN) return null;
    zLo = Math.max(zLo, Math.min(from[2], to[2]));
    zHi = Math.min(zHi, Math.max(from[2], to[2]));
    centerAt = (h) => {
      const t = (floorZ + h - from[2]) / rise;
      return [from[0] + t * (to[0] - from[0]), from[1] + t * (to[1] - from[1]), floorZ + h];
    };
  } else {
    if (place.kind === 'within') {
      zLo = Math.max(zLo, place.min[2]);
      zHi = Math.min(zHi, place.max[2]);
    }
    const boxed = place.kind === 'within' && place.max[2] - place.min[2] >= LEAST_SPAN;
    if (!boxed && !vary.some((field) => field === 'mirror.center' || field === 'mirror.center.z')) return null;
  }
  if (zHi - zLo < LEAST_SPAN) return null;
  return { lo: zLo - floorZ, hi: zHi - floorZ, centerAt };
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
  const sweep: PlacementSweep = {
    distances,
    heights,
    ...emptyGrid(o.distances * o.heights),
    current: sweepPoint(rig, used),
    bestCell: null,
    floorZ: used.floorZ,
    mirror: null,
  };
  sweep.bestCell = fillGrid(sweep, distances, heights, (d, h) => {
    const candidate = cloneRig(rig);
    candidate.projector.position = [C[0] + d * ux, C[1] + d * uy, used.floorZ + h];
    return candidate;
  }, o, used);
  const span = mirrorHeightSpan(rig, used, o.vary);
  if (span) {
    const rows = Math.max(2, o.mirrorHeights);
    const mirrorHeights = Array.from({ length: rows }, (_, j) => span.lo + ((span.hi - span.lo) * j) / (rows - 1));
    const grid: MirrorHeightSweep = { heights: mirrorHeights, ...emptyGrid(o.distances * rows), current: { distance: sweep.current.distance, height: C[2] - used.floorZ }, bestCell: null };
    grid.bestCell = fillGrid(grid, distances, mirrorHeights, (d, h) => {
      const candidate = cloneRig(rig);
      const M = span.centerAt(h);
      // the projector keeps its lens height and its distance along the same line, aimed at the same spot of the mirror
      for (let a = 0; a < 3; a++) candidate.projector.lookAt[a] += M[a] - C[a];
      candidate.mirror.center = M;
      candidate.projector.position = [M[0] + d * ux, M[1] + d * uy, P[2]];
      return candidate;
    }, o, used);
    sweep.mirror = grid;
  }
  return sweep;
}

function emptyGrid(n: number): SweepGrid {
  return { coverage: new Array(n).fill(null), arcmin: new Array(n).fill(null), lit: new Array(n).fill(null), score: new Array(n).fill(null), allowed: new Array(n).fill(false) };
}

/** Scores every cell of a grid (rows by `heights`, columns by `distances`); the best allowed cell, if any. */
function fillGrid(grid: SweepGrid, distances: number[], heights: number[], place: (distance: number, height: number) => Rig, o: SweepOptions, used: Room): SweepPoint | null {
  let bestScore = -Infinity;
  let best: SweepPoint | null = null;
  for (let j = 0; j < heights.length; j++)
    for (let i = 0; i < distances.length; i++) {
      const k = j * distances.length + i;
      const candidate = place(distances[i], heights[j]);
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
      grid.coverage[k] = e.figures.coverage;
      grid.arcmin[k] = e.figures.median;
      grid.lit[k] = e.figures.pixelsLit;
      grid.score[k] = e.figures.score;
      grid.allowed[k] = e.violation === 0;
      if (e.violation === 0 && (e.figures.score ?? -Infinity) > bestScore) {
        bestScore = e.figures.score!;
        best = { distance: distances[i], height: heights[j] };
      }
    }
  return best;
}
