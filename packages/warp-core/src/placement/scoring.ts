/**
 * How the planner scores one placement: the bounds it must keep (Deb's rules, Comput. Methods Appl.
 * Mech. Eng. 186 (2000) 311: a feasible candidate beats an infeasible one, and of two infeasible ones
 * the smaller violation wins) and, when it keeps them, its coverage and sharpness figures.
 */
import { length, sub } from '../math.js';
import { RigError, validateRigGeometry, type Rig } from '../rig/model.js';
import { projectorFrame } from '../optics/projector.js';
import { HitKind, Tracer } from '../trace.js';
import { bodyCorners } from '../analysis/body.js';
import { contentSolidAngle, coverageShare } from '../analysis/coverage.js';
import type { PlacementFigures } from '../analysis/analyze.js';
import { ARCMIN_PER_RADIAN, cellArcmin } from '../analysis/resolution.js';
import { cellMeasures, sampleFrame, type FrameSample } from '../analysis/sample.js';
import { brightnessFigures } from '../analysis/brightness.js';
import { pixelFigures } from '../analysis/spill.js';
import { roundFigure, Sorted } from '../analysis/stats.js';
import type { ProjectorFrame } from '../optics/projector.js';
import { roomLightViolations, roomPlaceViolations, type Room } from './room.js';

export type PlanObjective = 'coverage' | 'sharpness' | 'uniformity' | 'efficiency' | 'balanced';
export const PLAN_OBJECTIVES: readonly PlanObjective[] = ['coverage', 'sharpness', 'uniformity', 'efficiency', 'balanced'];

/** The four figures a placement is judged by, each a share from 0 (worst) to 1 (best). */
export const PLAN_MEASURES = ['coverage', 'sharpness', 'uniformity', 'efficiency'] as const;
export type PlanMeasure = (typeof PLAN_MEASURES)[number];

/**
 * Each objective's weights: the score is the weighted geometric mean Π fᵢ^wᵢ of the four figures
 * (weights summing to 1), so no figure can be traded to zero. A single-figure objective keeps a
 * hundredth on each other figure to break its ties (many placements light all of the dome).
 * `balanced` puts coverage first, sharpness second and the light third, and leaves uniformity out:
 * the warp mesh evens the brightness, at a cost in light that efficiency already counts (the planner's
 * own choice; README "Planning").
 */
export const OBJECTIVE_WEIGHTS: Readonly<Record<PlanObjective, Readonly<Record<PlanMeasure, number>>>> = {
  coverage: { coverage: 0.97, sharpness: 0.01, uniformity: 0.01, efficiency: 0.01 },
  sharpness: { coverage: 0.01, sharpness: 0.97, uniformity: 0.01, efficiency: 0.01 },
  uniformity: { coverage: 0.01, sharpness: 0.01, uniformity: 0.97, efficiency: 0.01 },
  efficiency: { coverage: 0.01, sharpness: 0.01, uniformity: 0.01, efficiency: 0.97 },
  balanced: { coverage: 0.7, sharpness: 0.2, uniformity: 0, efficiency: 0.1 },
};

/** Clearance between the projector's lens and the floor, and between parts, metres (common practice). */
export const DEFAULT_CLEARANCE = 0.05;

/**
 * The body assumed when the rig gives none, so that "the projector stays clear of the reflected light"
 * still means something: a small installation projector, about 35 × 30 × 15 cm (from memory: a common
 * size class; give projector.body for your own).
 */
export const NOMINAL_BODY = { width: 0.35, length: 0.3, height: 0.15 } as const;

export interface PlanFigures {
  coverage: number | null;
  /** Arcminutes per projector pixel over the lit dome. */
  median: number | null;
  p95: number | null;
  /** Share of the frame's pixels on the content. */
  pixelsLit: number | null;
  /** Lens-to-mirror depth along the lens axis: nearest and farthest lit point. */
  focusNear: number | null;
  focusFar: number | null;
  bodyShadow: number | null;
  /** The ideal arcminutes per pixel over the 95th-percentile one, at most 1. */
  sharpness: number | null;
  /** Dimmest over brightest lit patch before compensation (1 over report's brightness ratio). */
  uniformity: number | null;
  /** Share of the projector's light that reaches the content after compensation: pixels lit × (1 − light lost). */
  efficiency: number | null;
  score: number | null;
}

/** What one scoring needs beyond the rig. */
export interface ScoringSettings {
  objective: PlanObjective;
  /** Frame vertices sampled. */
  vertices: number;
  /** Cell subdivision depth of the coverage integral. */
  depth: number;
  clearance: number;
  /** Largest share of the dome the projector's body may hide. */
  maxShadow: number;
  /** With the sharpness objective: the least coverage a candidate must keep. */
  minCoverage: number;
  /** The room the placement must respect; none: only the physical bounds. */
  room?: Room;
}

export interface Evaluation {
  figures: PlanFigures;
  /** 0 when every bound is kept; otherwise how far they are broken, summed. */
  violation: number;
  reasons: string[];
}

/** The bounds a placement must keep; each broken one adds to the violation with a reason. */
export function placementViolations(rig: Rig, clearance = DEFAULT_CLEARANCE): { total: number; reasons: string[] } {
  const reasons: string[] = [];
  let total = 0;
  const add = (amount: number, why: string) => {
    if (amount > 0) {
      total += amount;
      reasons.push(why);
    }
  };
  const radius = rig.dome.radius;
  const { mirror, projector } = rig;
  const floor = rig.dome.floor;
  try {
    validateRigGeometry(rig);
  } catch (error) {
    if (!(error instanceof RigError)) throw error;
    add(1, `${error.field}: ${error.reason}`);
  }
  const far = length(mirror.center) + mirror.radius;
  add(far - (radius - clearance), 'the mirror must sit inside the dome');
  add(length(projector.position) - (radius - clearance), 'the projector must sit inside the dome');
  if (floor !== undefined) {
    add(-floor - (mirror.center[2] - mirror.radius), 'the mirror must sit above the floor');
    add(-floor + clearance - projector.position[2], 'the projector must sit above the floor');
  }
  add(mirror.radius + clearance - length(sub(projector.position, mirror.center)), 'the projector must stay clear of the mirror');
  if (projector.body && total === 0) {
    for (const corner of bodyCorners(projector.body, projectorFrame(projector))) {
      add(length(corner) - radius, "the projector's body must fit inside the dome");
      if (floor !== undefined) add(-floor - corner[2], "the projector's body must sit above the floor");
      add(mirror.radius - length(sub(corner, mirror.center)), "the projector's body must not touch the mirror");
    }
  }
  return { total, reasons: [...new Set(reasons)] };
}

const NO_FIGURES: PlanFigures = { coverage: null, median: null, p95: null, pixelsLit: null, focusNear: null, focusFar: null, bodyShadow: null, sharpness: null, uniformity: null, efficiency: null, score: null };

/** Nearest and farthest lit mirror point along the lens axis, and how many samples are lit. */
function focusDepths(samples: FrameSample, frame: ProjectorFrame): { near: number; far: number; lit: number } {
  const forward = frame.forward;
  let near = Infinity;
  let far = -Infinity;
  let lit = 0;
  for (let k = 0; k < samples.kind.length; k++) {
    if (samples.kind[k] !== HitKind.Lit) continue;
    lit++;
    const ray = samples.ray;
    const depth = samples.mirrorDistance[k] * (ray[3 * k] * forward[0] + ray[3 * k + 1] * forward[1] + ray[3 * k + 2] * forward[2]);
    near = Math.min(near, depth);
    far = Math.max(far, depth);
  }
  return { near, far, lit };
}

/** The four figures from report-style ones; null where a figure is unknown. */
function measures(coverage: number, idealArcmin: number, p95: number, ratioBefore: number | null, pixelsLit: number, lightLost: number | null): Pick<PlanFigures, PlanMeasure> {
  const share = (x: number) => (Number.isFinite(x) ? Math.max(0, Math.min(1, x)) : null);
  return {
    coverage: share(coverage),
    sharpness: share(idealArcmin / p95),
    uniformity: ratioBefore !== null && ratioBefore > 0 ? share(1 / ratioBefore) : null,
    efficiency: lightLost !== null ? share(pixelsLit * (1 - lightLost)) : null,
  };
}

/** The objective's weighted geometric mean of the four figures (OBJECTIVE_WEIGHTS); 0 when any is unknown or 0. */
export function objectiveScore(objective: PlanObjective, f: Pick<PlanFigures, PlanMeasure>): number {
  let log = 0;
  for (const m of PLAN_MEASURES) {
    const w = OBJECTIVE_WEIGHTS[objective][m];
    if (w === 0) continue;
    const v = f[m];
    if (v === null || !(v > 0)) return 0;
    log += w * Math.log(v);
  }
  return Math.exp(log);
}

/** Scores one placement; a rig without a body gets NOMINAL_BODY. */
export function evaluatePlacement(given: Rig, settings: ScoringSettings): Evaluation {
  const rig: Rig = given.projector.body ? given : { ...given, projector: { ...given.projector, body: { ...NOMINAL_BODY } } };
  const bounds = placementViolations(rig, settings.clearance);
  if (bounds.total > 0) return { figures: NO_FIGURES, violation: bounds.total, reasons: bounds.reasons };
  const place = settings.room ? roomPlaceViolations(rig, settings.room, settings.clearance) : { total: 0, reasons: [] };
  if (place.total > 0) return { figures: NO_FIGURES, violation: place.total, reasons: place.reasons };
  const { depth, objective, maxShadow, minCoverage } = settings;
  const tracer = new Tracer(rig);
  const samples = sampleFrame(tracer, { vertices: settings.vertices });
  const cells = cellMeasures(samples, depth);
  const contentAngle = contentSolidAngle(tracer);
  const coverage = coverageShare(cells.total, contentAngle);
  let shadow = 0;
  if (rig.projector.body) shadow = (cellMeasures(samples, depth, (kind) => kind === HitKind.Lit || kind === HitKind.Shadow).total - cells.total) / contentAngle;
  const arcmin = new Sorted(cellArcmin(cells));
  const { near, far, lit } = focusDepths(samples, tracer.frame);
  const [width, height] = rig.projector.resolution;
  const idealArcmin = Math.sqrt(contentAngle / (width * height)) * ARCMIN_PER_RADIAN;
  const p95 = arcmin.q(0.95);
  const brightness = brightnessFigures(cells);
  const litShare = pixelFigures(samples).lit ?? 0;
  const four = measures(coverage, idealArcmin, p95, brightness.ratioBefore, litShare, brightness.lightLost);
  const score = objectiveScore(objective, four);
  const reasons: string[] = [];
  let violation = 0;
  if (rig.projector.body && shadow > maxShadow) {
    violation += shadow - maxShadow;
    reasons.push(`the projector's body hides ${(shadow * 100).toFixed(1)}% of the dome (at most ${(maxShadow * 100).toFixed(1)}% allowed)`);
  }
  if (rig.projector.minFocus !== undefined && near < rig.projector.minFocus) {
    violation += rig.projector.minFocus - near;
    reasons.push('the mirror is nearer than projector.minFocus');
  }
  if (lit === 0) {
    violation += 1;
    reasons.push('no pixel lights the content');
  }
  if (settings.room) {
    const light = roomLightViolations(samples, settings.room);
    violation += light.total;
    reasons.push(...light.reasons);
  }
  if (objective === 'sharpness' && coverage < minCoverage) {
    violation += minCoverage - coverage;
    reasons.push('keeps less than 90% of the current coverage');
  }
  return {
    figures: {
      median: roundFigure(arcmin.q(0.5), 3),
      p95: roundFigure(p95, 3),
      pixelsLit: roundFigure(litShare),
      focusNear: roundFigure(near, 4),
      focusFar: roundFigure(far, 4),
      bodyShadow: roundFigure(shadow),
      ...roundMeasures(four),
      score: roundFigure(score, 5),
    },
    violation,
    reasons,
  };
}

/**
 * The plan's figures of a rig from `report`'s own figures of it (`analyzeRig`), so that the table the
 * planner prints is what `skyfold report` says of the rig it writes. `bodyShadow` is the planner's own
 * check (with the body it assumed when the rig gives none), since report counts a shadow only for a
 * body the rig names.
 */
export function figuresFromReport(f: PlacementFigures, objective: PlanObjective, bodyShadow: number | null): PlanFigures {
  const coverage = f.coverage.fraction;
  const { median, p95, ideal } = f.resolution;
  const four = measures(coverage ?? 0, ideal, p95 ?? Number.NaN, f.brightness.ratioBefore, f.pixels.lit ?? 0, f.brightness.lightLost);
  return {
    median,
    p95,
    pixelsLit: f.pixels.lit,
    focusNear: f.focus.depth.near,
    focusFar: f.focus.depth.far,
    bodyShadow: f.coverage.bodyShadow ?? bodyShadow,
    ...roundMeasures(four),
    coverage, // report's own figure
    score: roundFigure(objectiveScore(objective, four), 5),
  };
}

function roundMeasures(f: Pick<PlanFigures, PlanMeasure>): Pick<PlanFigures, PlanMeasure> {
  return { coverage: f.coverage === null ? null : roundFigure(f.coverage), sharpness: f.sharpness === null ? null : roundFigure(f.sharpness), uniformity: f.uniformity === null ? null : roundFigure(f.uniformity), efficiency: f.efficiency === null ? null : roundFigure(f.efficiency) };
}

/** Deb's comparison: true when a is better than b. */
export function betterPlacement(a: Evaluation, b: Evaluation): boolean {
  if (a.violation === 0 && b.violation === 0) return (a.figures.score ?? -Infinity) > (b.figures.score ?? -Infinity);
  if (a.violation === 0) return true;
  if (b.violation === 0) return false;
  return a.violation < b.violation;
}
