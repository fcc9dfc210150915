/**
 * `planRig`: searches placements of the mirror and the projector for the best coverage, sharpness or
 * a balance of both, within physical bounds, by differential evolution (Storn & Price, J. Global
 * Optimization 11 (1997) 341: DE/rand/1/bin), which keeps a population spread over the whole box and
 * is not trapped by one local optimum. Bounds are kept by Deb's rules (Comput. Methods Appl. Mech.
 * Eng. 186 (2000) 311): a feasible candidate beats an infeasible one, and of two infeasible ones the
 * smaller violation wins — so the answer never breaks a bound. Deterministic for a given seed.
 */
import { DEG, length, normalize, RAD, sub, type Vec3 } from '../math.js';
import { seededRandom } from '../random.js';
import { cloneRig } from '../rig/clone.js';
import { RigError, validateRigGeometry, type Rig } from '../rig/model.js';
import { projectorFrame } from '../optics/projector.js';
import { Tracer } from '../trace.js';
import { bodyCorners } from '../analysis/body.js';
import { contentSolidAngle } from '../analysis/coverage.js';
import { ARCMIN_PER_RADIAN, cellArcmin } from '../analysis/resolution.js';
import { cellFields, Fate, sampleFrame } from '../analysis/sample.js';
import { roundFigure as r, Sorted } from '../analysis/stats.js';

export type PlanObjective = 'coverage' | 'sharpness' | 'balanced';
export const PLAN_OBJECTIVES: readonly PlanObjective[] = ['coverage', 'sharpness', 'balanced'];

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
  /** Largest share of the dome the projector's body may hide. */
  maxShadow: number;
  /** Clearance between the projector's lens and the floor, and between parts (metres). */
  clearance: number;
}

export const PLAN_DEFAULTS: Readonly<PlanOptions> = {
  vary: ['mirror.center', 'projector.position'],
  objective: 'balanced',
  seed: 1,
  evaluations: 800,
  keep: 3,
  vertices: 2000,
  refineVertices: 12_000,
  maxShadow: 0.01,
  clearance: 0.05,
};

/**
 * The body assumed when the rig gives none, so that "the projector stays clear of the reflected light"
 * still means something: a small installation projector, about 35 × 30 × 15 cm (from memory: a common
 * size class; give projector.body for your own).
 */
export const NOMINAL_BODY = { width: 0.35, length: 0.3, height: 0.15 } as const;

/** One searched number: where it lives in the rig and its bounds. */
interface Dim {
  name: string;
  lo: number;
  hi: number;
  apply: (rig: Rig, x: number) => void;
}

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
  score: number | null;
}

export interface PlanCandidate {
  rig: Rig;
  figures: PlanFigures;
  /** The searched values by field name (metres, degrees for the axis). */
  values: Record<string, number>;
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
  notes: string[];
}

const AXES = ['x', 'y', 'z'] as const;

/** The dimensions for the `vary` list; throws RigError naming a field it cannot vary. */
function dimensions(rig: Rig, vary: string[], notes: string[]): Dim[] {
  const R = rig.dome.radius;
  const mr = rig.mirror.radius;
  const zFloor = rig.dome.floor !== undefined ? -rig.dome.floor : -0.5 * R;
  if (rig.dome.floor === undefined) notes.push(`dome.floor is not given: the search keeps parts above ${(-zFloor).toFixed(2)} m below the springline`);
  const varyLookAt = vary.some((v) => v.startsWith('projector.lookAt'));
  const dims: Dim[] = [];
  const seen = new Set<string>();
  for (const field of vary) {
    const m = /^(mirror\.center|projector\.position|projector\.lookAt|mirror\.axis)(?:\.([xyz]))?$/.exec(field);
    if (!m) throw new RigError('--vary', `cannot vary "${field}" (expected one of ${PLAN_FIELDS.join(', ')}, or one coordinate such as mirror.center.z)`);
    const [, base, comp] = m;
    if (base === 'mirror.axis') {
      if (comp) throw new RigError('--vary', 'mirror.axis is varied as a whole (its azimuth and elevation)');
      if (seen.has('mirror.axis')) continue;
      seen.add('mirror.axis');
      // axis as azimuth and elevation in degrees; the azimuth keeps the current one as a start
      dims.push({ name: 'mirror.axis.azimuth', lo: 0, hi: 360, apply: (g, x) => setAxis(g, x, undefined) });
      dims.push({ name: 'mirror.axis.elevation', lo: -30, hi: 90, apply: (g, x) => setAxis(g, undefined, x) });
      continue;
    }
    for (const c of comp ? [comp] : AXES) {
      const name = `${base}.${c}`;
      if (seen.has(name)) continue;
      seen.add(name);
      const i = AXES.indexOf(c as 'x');
      if (base === 'mirror.center') {
        const lo = i < 2 ? -R + mr : zFloor + mr;
        const hi = R - mr;
        dims.push({
          name,
          lo,
          hi,
          apply: (g, x) => {
            const d = x - g.mirror.center[i];
            g.mirror.center[i] = x;
            if (!varyLookAt) g.projector.lookAt[i] += d; // the projector stays aimed at the same spot of the mirror
          },
        });
      } else if (base === 'projector.position') {
        dims.push({ name, lo: i < 2 ? -R : zFloor + 0.05, hi: R, apply: (g, x) => (g.projector.position[i] = x) });
      } else {
        // aimed within 1.5 mirror radii of the mirror's centre
        dims.push({ name, lo: -1.5 * mr, hi: 1.5 * mr, apply: (g, x) => (g.projector.lookAt[i] = g.mirror.center[i] + x) });
      }
    }
  }
  if (dims.length === 0) throw new RigError('--vary', 'nothing to vary');
  // apply the mirror before the aim that is measured from it
  return [...dims.filter((d) => !d.name.startsWith('projector.lookAt')), ...dims.filter((d) => d.name.startsWith('projector.lookAt'))];
}

function axisAngles(a: Vec3): [number, number] {
  return [((Math.atan2(a[0], a[1]) * RAD) + 360) % 360, Math.asin(Math.max(-1, Math.min(1, a[2]))) * RAD];
}

function setAxis(g: Rig, az: number | undefined, el: number | undefined): void {
  const [az0, el0] = axisAngles(g.mirror.axis);
  const A = (az ?? az0) * DEG;
  const E = (el ?? el0) * DEG;
  g.mirror.axis = [Math.cos(E) * Math.sin(A), Math.cos(E) * Math.cos(A), Math.sin(E)];
}

function currentValue(rig: Rig, d: Dim): number {
  const [base, c] = [d.name.slice(0, d.name.lastIndexOf('.')), d.name.slice(d.name.lastIndexOf('.') + 1)];
  if (base === 'mirror.axis') return axisAngles(rig.mirror.axis)[c === 'azimuth' ? 0 : 1];
  const i = AXES.indexOf(c as 'x');
  if (base === 'mirror.center') return rig.mirror.center[i];
  if (base === 'projector.position') return rig.projector.position[i];
  return rig.projector.lookAt[i] - rig.mirror.center[i];
}

/** The bounds a placement must keep; each broken one adds to the violation with a reason. */
export function placementViolations(rig: Rig, clearance = PLAN_DEFAULTS.clearance): { total: number; reasons: string[] } {
  const reasons: string[] = [];
  let total = 0;
  const add = (amount: number, why: string) => {
    if (amount > 0) {
      total += amount;
      reasons.push(why);
    }
  };
  const R = rig.dome.radius;
  const { mirror, projector } = rig;
  const floor = rig.dome.floor;
  try {
    validateRigGeometry(rig);
  } catch (e) {
    if (!(e instanceof RigError)) throw e;
    add(1, `${e.field}: ${e.reason}`);
  }
  const far = length(mirror.center) + mirror.radius;
  add(far - (R - clearance), 'the mirror must sit inside the dome');
  add(length(projector.position) - (R - clearance), 'the projector must sit inside the dome');
  if (floor !== undefined) {
    add(-floor - (mirror.center[2] - mirror.radius), 'the mirror must sit above the floor');
    add(-floor + clearance - projector.position[2], 'the projector must sit above the floor');
  }
  add(mirror.radius + clearance - length(sub(projector.position, mirror.center)), 'the projector must stay clear of the mirror');
  if (projector.body && total === 0) {
    for (const p of bodyCorners(projector.body, projectorFrame(projector))) {
      add(length(p) - R, "the projector's body must fit inside the dome");
      if (floor !== undefined) add(-floor - p[2], "the projector's body must sit above the floor");
      add(mirror.radius - length(sub(p, mirror.center)), "the projector's body must not touch the mirror");
    }
  }
  return { total, reasons: [...new Set(reasons)] };
}

interface Evaluation {
  figures: PlanFigures;
  violation: number;
  reasons: string[];
}

function evaluate(given: Rig, o: PlanOptions, objective: PlanObjective, minCoverage: number, vertices = o.vertices, depth = 2): Evaluation {
  const rig: Rig = given.projector.body ? given : { ...given, projector: { ...given.projector, body: { ...NOMINAL_BODY } } };
  const v = placementViolations(rig, o.clearance);
  const empty: PlanFigures = { coverage: null, median: null, p95: null, pixelsLit: null, focusNear: null, focusFar: null, bodyShadow: null, score: null };
  if (v.total > 0) return { figures: empty, violation: v.total, reasons: v.reasons };
  const tracer = new Tracer(rig);
  const s = sampleFrame(tracer, { vertices });
  const cells = cellFields(s, depth);
  const omegaC = contentSolidAngle(tracer);
  const coverage = cells.total / omegaC;
  let shadow = 0;
  if (rig.projector.body) shadow = (cellFields(s, depth, (f) => f === Fate.Lit || f === Fate.Shadow).total - cells.total) / omegaC;
  const am = new Sorted(cellArcmin(cells));
  const f = tracer.frame;
  let near = Infinity;
  let far = -Infinity;
  let lit = 0;
  for (let k = 0; k < s.fate.length; k++) {
    if (s.fate[k] !== Fate.Lit) continue;
    lit++;
    const z = s.mirrorDistance[k] * (s.ray[3 * k] * f.forward[0] + s.ray[3 * k + 1] * f.forward[1] + s.ray[3 * k + 2] * f.forward[2]);
    near = Math.min(near, z);
    far = Math.max(far, z);
  }
  const [W, H] = rig.projector.resolution;
  const ideal = Math.sqrt(omegaC / (W * H)) * ARCMIN_PER_RADIAN;
  const p95 = am.q(0.95);
  let score: number;
  if (!(coverage > 0) || !Number.isFinite(p95)) score = 0;
  else if (objective === 'coverage') score = coverage + 1e-3 * Math.min(1, ideal / p95);
  else if (objective === 'sharpness') score = ideal / p95;
  else score = coverage * Math.sqrt(Math.min(1, ideal / p95));
  const reasons: string[] = [];
  let violation = 0;
  if (rig.projector.body && shadow > o.maxShadow) {
    violation += shadow - o.maxShadow;
    reasons.push(`the projector's body hides ${(shadow * 100).toFixed(1)}% of the dome (at most ${(o.maxShadow * 100).toFixed(1)}% allowed)`);
  }
  if (rig.projector.minFocus !== undefined && near < rig.projector.minFocus) {
    violation += rig.projector.minFocus - near;
    reasons.push('the mirror is nearer than projector.minFocus');
  }
  if (lit === 0) {
    violation += 1;
    reasons.push('no pixel lights the content');
  }
  if (objective === 'sharpness' && coverage < minCoverage) {
    violation += minCoverage - coverage;
    reasons.push('keeps less than 90% of the current coverage');
  }
  return {
    figures: {
      coverage: r(coverage),
      median: r(am.q(0.5), 3),
      p95: r(p95, 3),
      pixelsLit: r(lit / s.fate.length),
      focusNear: r(near, 4),
      focusFar: r(far, 4),
      bodyShadow: r(shadow),
      score: r(score, 5),
    },
    violation,
    reasons,
  };
}

/** Deb's comparison: true when a is better than b. */
function better(a: Evaluation, b: Evaluation): boolean {
  if (a.violation === 0 && b.violation === 0) return (a.figures.score ?? -Infinity) > (b.figures.score ?? -Infinity);
  if (a.violation === 0) return true;
  if (b.violation === 0) return false;
  return a.violation < b.violation;
}

export function planRig(rig: Rig, options: Partial<PlanOptions> = {}): PlanResult {
  const o: PlanOptions = { ...PLAN_DEFAULTS, ...options };
  const notes: string[] = [];
  if (!rig.projector.body) notes.push(`projector.body is not given: a ${NOMINAL_BODY.width * 100} × ${NOMINAL_BODY.length * 100} × ${NOMINAL_BODY.height * 100} cm body is assumed to keep the projector out of the reflected light`);
  const dims = dimensions(rig, o.vary, notes);
  const n = dims.length;
  const rand = seededRandom(o.seed);
  const build = (x: readonly number[]) => {
    const g = cloneRig(rig);
    for (let i = 0; i < n; i++) dims[i].apply(g, x[i]);
    if (g.mirror.axis.some((a) => !Number.isFinite(a))) g.mirror.axis = normalize(rig.mirror.axis);
    return g;
  };
  const x0 = dims.map((d) => Math.min(d.hi, Math.max(d.lo, currentValue(rig, d))));
  const currentEval = evaluate(rig, o, o.objective, 0);
  const minCoverage = 0.9 * (currentEval.figures.coverage ?? 0);
  const ev = (x: number[]) => evaluate(build(x), o, o.objective, minCoverage);
  const pop = Math.max(12, Math.min(40, 8 * n));
  const X: number[][] = [x0];
  while (X.length < pop) X.push(dims.map((d) => d.lo + rand() * (d.hi - d.lo)));
  const E = X.map((x) => ev(x));
  let used = pop;
  const archive: { x: number[]; e: Evaluation }[] = X.map((x, i) => ({ x, e: E[i] }));
  const F = 0.6;
  const CR = 0.9;
  while (used < o.evaluations) {
    for (let i = 0; i < pop && used < o.evaluations; i++) {
      let a: number, b: number, c: number;
      do a = Math.floor(rand() * pop); while (a === i);
      do b = Math.floor(rand() * pop); while (b === i || b === a);
      do c = Math.floor(rand() * pop); while (c === i || c === a || c === b);
      const jr = Math.floor(rand() * n);
      const y = X[i].slice();
      for (let j = 0; j < n; j++) {
        if (j !== jr && rand() >= CR) continue;
        let v = X[a][j] + F * (X[b][j] - X[c][j]);
        const { lo, hi } = dims[j];
        if (dims[j].name === 'mirror.axis.azimuth') v = ((v % 360) + 360) % 360;
        else if (v < lo) v = lo + rand() * (X[i][j] - lo); // bounce back inside between the bound and the parent
        else if (v > hi) v = hi - rand() * (hi - X[i][j]);
        y[j] = v;
      }
      const e = ev(y);
      used++;
      archive.push({ x: y, e });
      if (!better(E[i], e)) {
        X[i] = y;
        E[i] = e;
      }
    }
  }
  // the best few distinct feasible candidates, re-measured more finely
  const span = dims.map((d) => d.hi - d.lo);
  const feasible = archive.filter((q) => q.e.violation === 0).sort((p, q) => (q.e.figures.score ?? 0) - (p.e.figures.score ?? 0));
  const picked: { x: number[]; e: Evaluation }[] = [];
  for (const q of feasible) {
    if (picked.length >= o.keep) break;
    if (picked.some((p) => Math.hypot(...p.x.map((v, j) => (v - q.x[j]) / span[j])) < 0.05)) continue;
    picked.push(q);
  }
  const fine = Math.max(o.vertices, o.refineVertices);
  const values = (x: readonly number[]) => Object.fromEntries(dims.map((d, j) => [d.name, r(x[j], 4)!]));
  const best = picked
    .map((q) => {
      const g = build(q.x);
      return { rig: g, figures: evaluate(g, o, o.objective, minCoverage, fine, 3).figures, values: values(q.x) };
    })
    .sort((p, q) => (q.figures.score ?? 0) - (p.figures.score ?? 0));
  const cur = evaluate(rig, o, o.objective, 0, fine, 3);
  if (best.length === 0) notes.push('no placement within the bounds lights the content; widen the search (--vary) or check the rig');
  const bounds = Object.fromEntries(dims.map((d) => [d.name, [r(d.lo, 4)!, r(d.hi, 4)!] as [number, number]]));
  return {
    current: { rig, figures: cur.figures, values: values(x0), feasible: cur.violation === 0, violations: cur.reasons },
    best,
    evaluations: used,
    objective: o.objective,
    seed: o.seed,
    vary: o.vary,
    bounds,
    notes,
  };
}
