/**
 * `planRig`: searches placements of the mirror and the projector for the best coverage, sharpness or
 * a balance of both, within physical bounds, by differential evolution (`differential-evolution.ts`),
 * which keeps a population spread over the whole box and is not trapped by one local optimum. Each
 * placement is scored by `scoring.ts`, whose bounds follow Deb's rules — so the answer never breaks
 * a bound. Deterministic for a given seed.
 */
import { DEG, directionFromAzAlt, normalize, RAD, type Vec3 } from '../math.js';
import { cloneRig } from '../rig/clone.js';
import { OptionError, type Rig, type RoomModel } from '../rig/model.js';
import { resolveRoom, type Room } from './room.js';
import { describeMoves, type MoveStep } from './moves.js';
import { notice, type Notice } from '../notice.js';
import { roundFigure } from '../analysis/stats.js';
import { placementFigures, REPORT_DEFAULTS } from '../analysis/analyze.js';
import { differentialEvolution, type ScoredPoint } from './differential-evolution.js';
import { betterPlacement, PLAN_MEASURES, type PlanMeasure, DEFAULT_CLEARANCE, evaluatePlacement, figuresFromReport, NOMINAL_BODY, type Evaluation, type PlanFigures, type PlanObjective, type ScoringSettings } from './scoring.js';

export { NOMINAL_BODY, OBJECTIVE_WEIGHTS, PLAN_MEASURES, PLAN_OBJECTIVES, type PlanMeasure, placementViolations, type PlanFigures, type PlanObjective } from './scoring.js';

/** Fields `plan` may vary; a point field may be narrowed to one coordinate (`mirror.center.z`). */
export const PLAN_FIELDS = ['mirror.center', 'mirror.axis', 'projector.position', 'projector.lookAt'] as const;

export interface PlanOptions {
  vary: string[];
  objective: PlanObjective;
  seed: number;
  /** Candidate rigs to evaluate in all. */
  evaluations: number;
  /** Best distinct candidates to return. */
  keep: number;
  /** Frame vertices per evaluation (coarse). */
  vertices: number;
  /** Frame vertices when the best few and the current rig are measured again for the table. */
  refineVertices: number;
  /** Frame vertices when the table's rigs are measured as `report` measures them (its --rays). */
  reportVertices: number;
  /** Largest share of the dome the projector's body may hide. */
  maxShadow: number;
  /** Clearance between the projector's lens and the floor, and between parts (metres). */
  clearance: number;
  /**
   * Called as the work advances with the steps done of all (every scored candidate and each
   * re-measurement), last with done = total; the caller draws any progress. Optional.
   */
  onProgress?: (done: number, total: number) => void;
  /** The room, over the rig's own `room` section field by field (README "Planning"). */
  room?: RoomModel;
}

export const PLAN_DEFAULTS: Readonly<PlanOptions> = {
  vary: ['mirror.center', 'projector.position'],
  objective: 'balanced',
  seed: 1,
  evaluations: 800,
  keep: 3,
  vertices: 2000,
  refineVertices: 12_000,
  reportVertices: REPORT_DEFAULTS.vertices,
  maxShadow: 0.01,
  clearance: DEFAULT_CLEARANCE,
};

/** One searched number: where it lives in the rig and its bounds. */
interface Dimension {
  name: string;
  lo: number;
  hi: number;
  apply: (rig: Rig, value: number) => void;
}

export interface PlanCandidate {
  rig: Rig;
  figures: PlanFigures;
  /** The searched values by field name (metres, degrees for the axis). */
  values: Record<string, number>;
  /** The measures in which this candidate is the best of those shown (best candidates only). */
  bestFor: PlanMeasure[];
  /** The moves from the current rig to this one, in the room's words. */
  moves: MoveStep[];
}

export interface PlanResult {
  current: PlanCandidate & { feasible: boolean; violations: string[] };
  best: PlanCandidate[];
  evaluations: number;
  objective: PlanObjective;
  seed: number;
  vary: string[];
  /** The bounds searched, by field name. */
  bounds: Record<string, [number, number]>;
  /** The room the candidates respect (the rig's, the options', the defaults). */
  room: Room;
  notes: Notice[];
}

const AXES = ['x', 'y', 'z'] as const;

/** The dimensions for the `vary` list; throws OptionError naming a field it cannot vary. */
function dimensions(rig: Rig, vary: string[], room: Room, notes: Notice[]): Dimension[] {
  const domeRadius = rig.dome.radius;
  const mirrorRadius = rig.mirror.radius;
  const floorHeight = room.floorZ;
  const place = room.mirror;
  if (rig.dome.floor === undefined) {
    notes.push(notice('plan.floor-assumed', 'dome.floor is not given: the search keeps parts above {length:depth} below the springline', { parameter: 'dome.floor', lengths: { depth: -floorHeight } }));
  }
  const varyLookAt = vary.some((field) => field.startsWith('projector.lookAt'));
  const found: Dimension[] = [];
  const seen = new Set<string>();
  for (const field of vary) {
    const match = /^(mirror\.center|projector\.position|projector\.lookAt|mirror\.axis)(?:\.([xyz]))?$/.exec(field);
    if (!match) throw new OptionError('vary', `cannot vary "${field}" (expected one of ${PLAN_FIELDS.join(', ')}, or one coordinate such as mirror.center.z)`);
    const [, base, component] = match;
    if (base === 'mirror.axis') {
      if (component) throw new OptionError('vary', 'mirror.axis is varied as a whole (its azimuth and elevation)');
      if (seen.has('mirror.axis')) continue;
      seen.add('mirror.axis');
      // axis as azimuth and elevation in degrees; the azimuth keeps the current one as a start
      found.push({ name: 'mirror.axis.azimuth', lo: 0, hi: 360, apply: (candidate, value) => setAxis(candidate, value, undefined) });
      found.push({ name: 'mirror.axis.elevation', lo: -30, hi: 90, apply: (candidate, value) => setAxis(candidate, undefined, value) });
      continue;
    }
    if (base === 'mirror.center' && place.kind === 'fixed') {
      if (!seen.has('mirror.fixed')) notes.push(notice('plan.mirror-fixed', `room.mirror is fixed: ${field} is not searched`, { parameter: 'room.mirror' }));
      seen.add('mirror.fixed');
      continue;
    }
    if (base === 'mirror.center' && place.kind === 'along') {
      if (seen.has('mirror.along')) continue;
      seen.add('mirror.along');
      const { from, to } = place;
      // the share of the way from the segment's first end to its second
      found.push({
        name: 'mirror.along',
        lo: 0,
        hi: 1,
        apply: (candidate, t) => {
          for (let a = 0; a < 3; a++) {
            const value = from[a] + t * (to[a] - from[a]);
            if (!varyLookAt) candidate.projector.lookAt[a] += value - candidate.mirror.center[a];
            candidate.mirror.center[a] = value;
          }
        },
      });
      continue;
    }
    for (const axisName of component ? [component] : AXES) {
      const name = `${base}.${axisName}`;
      if (seen.has(name)) continue;
      seen.add(name);
      const axis = AXES.indexOf(axisName as 'x');
      if (base === 'mirror.center') {
        const within = place.kind === 'within' ? place : null;
        found.push({
          name,
          lo: Math.max(axis < 2 ? -domeRadius + mirrorRadius : floorHeight + mirrorRadius, within ? within.min[axis] : -Infinity),
          hi: Math.min(domeRadius - mirrorRadius, within ? within.max[axis] : Infinity),
          apply: (candidate, value) => {
            const moved = value - candidate.mirror.center[axis];
            candidate.mirror.center[axis] = value;
            if (!varyLookAt) candidate.projector.lookAt[axis] += moved; // the projector stays aimed at the same spot of the mirror
          },
        });
      } else if (base === 'projector.position') {
        // the lens's height within room.lensHeight above the floor
        const lo = axis < 2 ? -domeRadius : Math.max(floorHeight + 0.05, floorHeight + room.lensHeight[0]);
        const hi = axis < 2 ? domeRadius : Math.min(domeRadius, floorHeight + room.lensHeight[1]);
        found.push({ name, lo, hi: Math.max(lo, hi), apply: (candidate, value) => (candidate.projector.position[axis] = value) });
      } else {
        // aimed within 1.5 mirror radii of the mirror's centre
        found.push({ name, lo: -1.5 * mirrorRadius, hi: 1.5 * mirrorRadius, apply: (candidate, value) => (candidate.projector.lookAt[axis] = candidate.mirror.center[axis] + value) });
      }
    }
  }
  if (found.length === 0) throw new OptionError('vary', 'nothing to vary (room.mirror fixes the mirror)');
  // apply the mirror before the aim that is measured from it
  const isAim = (d: Dimension) => d.name.startsWith('projector.lookAt');
  return [...found.filter((d) => !isAim(d)), ...found.filter(isAim)];
}

/** Azimuth and elevation of a unit axis, degrees (DESIGN.md azimuth convention). */
function axisAngles(axis: Vec3): [number, number] {
  return [((Math.atan2(axis[0], axis[1]) * RAD) + 360) % 360, Math.asin(Math.max(-1, Math.min(1, axis[2]))) * RAD];
}

function setAxis(candidate: Rig, azimuth: number | undefined, elevation: number | undefined): void {
  const [currentAzimuth, currentElevation] = axisAngles(candidate.mirror.axis);
  const az = (azimuth ?? currentAzimuth) * DEG;
  const el = (elevation ?? currentElevation) * DEG;
  candidate.mirror.axis = directionFromAzAlt(az, el);
}

function currentValue(rig: Rig, dimension: Dimension, room: Room): number {
  const cut = dimension.name.lastIndexOf('.');
  const base = dimension.name.slice(0, cut);
  const component = dimension.name.slice(cut + 1);
  if (dimension.name === 'mirror.along') return alongShare(rig, room);
  if (base === 'mirror.axis') return axisAngles(rig.mirror.axis)[component === 'azimuth' ? 0 : 1];
  const axis = AXES.indexOf(component as 'x');
  if (base === 'mirror.center') return rig.mirror.center[axis];
  if (base === 'projector.position') return rig.projector.position[axis];
  return rig.projector.lookAt[axis] - rig.mirror.center[axis];
}

/** Where the mirror's centre sits along room.mirror.along, as a share of the way (0 when not along one). */
function alongShare(rig: Rig, room: Room): number {
  const m = room.mirror;
  if (m.kind !== 'along') return 0;
  const d = [0, 1, 2].map((a) => m.to[a] - m.from[a]);
  const l2 = d[0] ** 2 + d[1] ** 2 + d[2] ** 2;
  return [0, 1, 2].reduce((sum, a) => sum + (rig.mirror.center[a] - m.from[a]) * d[a], 0) / l2;
}

/** The rig with the searched values written in. */
function rigWith(rig: Rig, dims: readonly Dimension[], point: readonly number[]): Rig {
  const candidate = cloneRig(rig);
  dims.forEach((dimension, index) => dimension.apply(candidate, point[index]));
  if (candidate.mirror.axis.some((component) => !Number.isFinite(component))) candidate.mirror.axis = normalize(rig.mirror.axis);
  return candidate;
}

/** True when figures a are at least as good as b in all four measures and better in one. */
export function dominates(a: PlanFigures, b: PlanFigures): boolean {
  let better = false;
  for (const m of PLAN_MEASURES) {
    const x = a[m] ?? 0;
    const y = b[m] ?? 0;
    if (x < y) return false;
    if (x > y) better = true;
  }
  return better;
}

/**
 * Up to `keep` feasible points from the non-dominated set (the Pareto front over coverage, sharpness,
 * uniformity and efficiency): the objective's best first, then the front's best in each measure, then
 * by score; none within 5% of the box's span of one already taken, none below `coverageBar`.
 */
function frontChoice(archive: readonly ScoredPoint<Evaluation>[], dims: readonly Dimension[], keep: number, coverageBar: number): ScoredPoint<Evaluation>[] {
  const span = dims.map((d) => d.hi - d.lo || 1);
  // a trade worth showing keeps most of the dome lit: 90% of the current coverage at least
  const feasible = archive.filter((entry) => entry.score.violation === 0 && (entry.score.figures.score ?? 0) > 0 && (entry.score.figures.coverage ?? 0) >= coverageBar);
  const front = feasible.filter((entry) => !feasible.some((other) => dominates(other.score.figures, entry.score.figures)));
  const byScore = [...front].sort((a, b) => (b.score.figures.score ?? 0) - (a.score.figures.score ?? 0));
  const picked: ScoredPoint<Evaluation>[] = [];
  const take = (entry: ScoredPoint<Evaluation> | undefined) => {
    if (!entry || picked.length >= keep) return;
    const distance = (other: ScoredPoint<Evaluation>) => Math.hypot(...other.point.map((value, index) => (value - entry.point[index]) / span[index]));
    if (!picked.some((other) => distance(other) < 0.05)) picked.push(entry);
  };
  take(byScore[0]);
  for (const m of PLAN_MEASURES) take([...byScore].sort((a, b) => (b.score.figures[m] ?? 0) - (a.score.figures[m] ?? 0))[0]);
  for (const entry of byScore) take(entry);
  return picked;
}

/** For each candidate, the measures in which it is the best of the candidates shown. */
function leaders(candidates: readonly PlanCandidate[]): void {
  for (const m of PLAN_MEASURES) {
    let top: PlanCandidate | undefined;
    for (const c of candidates) if ((c.figures[m] ?? -1) > (top?.figures[m] ?? -1)) top = c;
    top?.bestFor.push(m);
  }
}

export function planRig(rig: Rig, options: Partial<PlanOptions> = {}): PlanResult {
  const settings: PlanOptions = { ...PLAN_DEFAULTS, ...options };
  const notes: Notice[] = [];
  if (!rig.projector.body) {
    const text = 'projector.body is not given: a {length:width} × {length:length} × {length:height} body is assumed to keep the projector out of the reflected light';
    notes.push(notice('plan.body-assumed', text, { parameter: 'projector.body', lengths: { ...NOMINAL_BODY } }));
  }
  const room = resolveRoom(rig, { ...(options.maxShadow !== undefined ? { maxShadow: options.maxShadow } : {}), ...settings.room }, notes, NOMINAL_BODY);
  const dims = dimensions(rig, settings.vary, room, notes);
  const coarse: ScoringSettings = { objective: settings.objective, vertices: settings.vertices, depth: 2, clearance: settings.clearance, maxShadow: room.maxShadow, minCoverage: 0, room };
  const fine: ScoringSettings = { ...coarse, vertices: Math.max(settings.vertices, settings.refineVertices), depth: 3 };
  const start = dims.map((d) => Math.min(d.hi, Math.max(d.lo, currentValue(rig, d, room))));
  // steps: the current rig's coarse score, the search, the best few and the current rig re-measured
  const total = 1 + settings.evaluations + settings.keep + 1;
  let done = 0;
  const step = () => settings.onProgress?.(Math.min(++done, total - 1), total);
  const minCoverage = 0.9 * (evaluatePlacement(rig, coarse).figures.coverage ?? 0);
  step();
  const search = differentialEvolution<Evaluation>({
    ranges: dims.map((d) => ({ lo: d.lo, hi: d.hi, periodic: d.name === 'mirror.axis.azimuth' })),
    start,
    evaluations: settings.evaluations,
    seed: settings.seed,
    populationSize: Math.max(12, Math.min(40, 8 * dims.length)),
    score: (point) => {
      const evaluation = evaluatePlacement(rigWith(rig, dims, point), { ...coarse, minCoverage });
      step();
      return evaluation;
    },
    better: betterPlacement,
  });
  // the best few distinct feasible candidates, re-measured more finely
  const values = (point: readonly number[]) => Object.fromEntries(dims.map((d, index) => [d.name, roundFigure(point[index], 4)!]));
  // the table's figures are report's own (the same trace at the same density), the bounds checked finely
  const reported = (candidate: Rig, check: Evaluation) =>
    figuresFromReport(placementFigures(candidate, { vertices: settings.reportVertices }), settings.objective, check.figures.bodyShadow);
  const best = frontChoice(search.archive, dims, settings.keep, minCoverage)
    .map((entry) => {
      const candidate = rigWith(rig, dims, entry.point);
      const check = evaluatePlacement(candidate, { ...fine, minCoverage });
      step();
      return { rig: candidate, figures: reported(candidate, check), values: values(entry.point), bestFor: [] as PlanMeasure[], moves: describeMoves(rig, candidate), check };
    })
    // the lit share as report counts it, too: the table never shows a candidate below room.leastLit
    .filter((c) => c.check.violation === 0 && (c.figures.pixelsLit ?? 0) >= room.leastLit)
    .map(({ check: _check, ...c }) => c)
    .sort((a, b) => (b.figures.score ?? 0) - (a.figures.score ?? 0));
  leaders(best);
  const currentCheck = evaluatePlacement(rig, fine);
  const current = { ...currentCheck, figures: reported(rig, currentCheck) };
  if (best.length && currentCheck.violation === 0 && (best[0].figures.score ?? 0) <= (current.figures.score ?? 0)) {
    notes.push(notice('plan.no-better', 'no placement found scores better than the current one by the objective: the current rig may stay as it is'));
  }
  settings.onProgress?.(total, total);
  if (best.length === 0) notes.push(notice('plan.nothing-lit', 'no placement within the bounds lights the content; widen the search ({option:vary}) or check the rig'));
  const bounds = Object.fromEntries(dims.map((d) => [d.name, [roundFigure(d.lo, 4)!, roundFigure(d.hi, 4)!] as [number, number]]));
  return {
    current: { rig, figures: current.figures, values: values(start), bestFor: [], moves: [], feasible: current.violation === 0, violations: current.reasons },
    best,
    evaluations: search.evaluations,
    objective: settings.objective,
    seed: settings.seed,
    vary: settings.vary,
    bounds,
    room,
    notes,
  };
}
