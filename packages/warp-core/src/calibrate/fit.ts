/**
 * `fit`: the rig that best explains tape distances and observed marker positions, by weighted least
 * squares (Levenberg–Marquardt, `levenberg-marquardt.ts`), optionally robust (Huber's M-estimator by
 * iteratively reweighted least squares: Huber 1964; Holland & Welsch 1977), with standard errors from
 * the covariance s²·(JᵀWJ)⁻¹ and a check of what the data cannot determine (the near-null directions
 * of JᵀWJ, from its eigen-decomposition).
 *
 * Residuals: a distance's is (model − measured)/σ. An observation's is the angle on the sky between
 * the observed direction and the direction the rig traces for that pixel, as the two components of
 * the logarithmic map at the observed direction (a tangent-plane vector whose length is that angle,
 * smooth even where the angle is zero), over σ. A pixel that stops hitting the mirror is traced on
 * as if the mirror sphere were whole and, past its silhouette, by the reflection law continued beyond
 * grazing (`extendedPixelDirection`): the residual stays continuous and keeps growing with the miss,
 * so the solver is steered back rather than thrown out or stranded.
 */
import { vec3 } from 'gl-matrix';
import { rayDomeExit } from '../optics/dome.js';
import { directionFromAzAlt, azAltFromDirection, dot, length, normalize, sub, type ReadonlyVec3, type Vec3 } from '../math.js';
import { onCap, raySphereFirstHit } from '../optics/mirror.js';
import { pixelToRay, projectorFrame, type ProjectorFrame } from '../optics/projector.js';
import { cloneRig } from '../rig/clone.js';
import { mirrorPole, RigError, validateRigGeometry, type Rig } from '../rig/model.js';
import { levenbergMarquardt, numericJacobian } from './levenberg-marquardt.js';
import { normalEquations, symmetricEigen } from './matrix.js';
import { FREE_QUANTITIES, pointLabel, type DistanceMeasurement, type FreeQuantity, type MeasurementSet, type Observation, type PointRef } from './measurements.js';
import { locatePoint } from './trilaterate.js';
import { notice, type Notice } from '../notice.js';

export interface FitOptions {
  /** Huber-weight the items so one bad reading cannot drag the fit. */
  robust: boolean;
  /** Huber's threshold in standard deviations (1.345: 95% efficiency for normal errors, common practice). */
  huberK: number;
  /** Most solver iterations (per reweighting round when robust). */
  maxIterations: number;
  /** Start the mirror pole / projector lens from a trilateration of their rim and zenith distances. */
  trilaterate: boolean;
  /** Replaces the measurement set's `free` list. */
  free?: FreeQuantity[];
}

export const FIT_DEFAULTS: Readonly<FitOptions> = {
  robust: false,
  huberK: 1.345,
  maxIterations: 200,
  trilaterate: true,
};

/** Relative eigenvalues of the scaled normal matrix below these: undetermined; weakly determined. */
export const RANK_TOLERANCE = 1e-9;
export const WEAK_TOLERANCE = 1e-5;

export type QuantityKind = 'length' | 'angle' | 'number';

export interface FitParameter {
  name: FreeQuantity;
  /** length = metres, angle = radians, number = as is. projector.lookAt is given as the point. */
  kind: QuantityKind;
  initial: number[];
  value: number[];
  /** One standard error per component; null where the data cannot determine it. */
  stderr: (number | null)[];
  /** projector.lookAt only: standard errors of the aim's azimuth and elevation, radians. */
  aimStderr?: (number | null)[];
}

export interface DistanceResidual {
  kind: 'distance';
  field: string;
  label: string;
  /** Metres. */
  measured: number;
  model: number;
  /** model − measured, metres. */
  residual: number;
  sigma: number;
  /** residual / sigma. */
  normalized: number;
  /** Robust weight in (0, 1] (1 without robust reweighting). */
  weight: number;
}

export interface ObservationResidual {
  kind: 'observation';
  field: string;
  label: string;
  pixel: [number, number];
  /** Observed azimuth and altitude, radians. */
  observed: [number, number];
  /** Where the rig sends the pixel, radians. */
  model: [number, number];
  /** False when the pixel misses the mirror's cap in the rig (its model direction is then a stand-in). */
  onMirror: boolean;
  /** Angle between observed and modelled directions, radians. */
  angle: number;
  sigma: number;
  normalized: number;
  weight: number;
}

export type FitResidual = DistanceResidual | ObservationResidual;

export interface Degeneracy {
  /** The free quantities along the poorly determined direction, largest share first. */
  quantities: FreeQuantity[];
  /** The scalar components involved, e.g. "projector.lensShift[1]". */
  components: string[];
  /** 'undetermined': the data cannot tell them apart at all; 'weak': only barely. */
  severity: 'undetermined' | 'weak';
  /** How much this direction inflates standard errors against well-separated data (1/√λ; Infinity when undetermined). */
  inflation: number;
  /** Where it was found: at the solution, or only at the starting rig (the solver then moved off it). */
  where: 'start' | 'solution';
  message: string;
}

export interface FitSummary {
  /** Root mean square of the residual components in standard deviations. */
  rms: number;
  /** Metres, over the distances (null without any). */
  rmsDistance: number | null;
  /** Radians, over the observations (null without any). */
  rmsAngle: number | null;
}

export interface FitResult {
  rig: Rig;
  initialRig: Rig;
  free: FreeQuantity[];
  before: FitSummary;
  after: FitSummary;
  residuals: FitResidual[];
  initialResiduals: FitResidual[];
  parameters: FitParameter[];
  worst: FitResidual | null;
  degeneracies: Degeneracy[];
  warnings: Notice[];
  /** What was done beyond the plain solve (trilateration seeds, reweighting rounds). */
  notes: Notice[];
  equations: number;
  unknowns: number;
  /** s² = Σr²/(equations − unknowns): the scale applied to the covariance (1 without redundancy). */
  varianceFactor: number;
  iterations: number;
  converged: boolean;
}

// ---------------------------------------------------------------------------------------------
// The parameter vector: each free quantity as a block of scalars in metres and radians.

interface Block {
  name: FreeQuantity;
  kind: QuantityKind;
  /** Scalar names, for degeneracy messages. */
  components: string[];
  /** Finite-difference step per scalar. */
  step: number;
  read(rig: Rig): number[];
  write(rig: Rig, p: ArrayLike<number>, at: number): void;
  /** The person-facing value (a point for lookAt). */
  value(rig: Rig): number[];
}

const LENGTH_STEP = 1e-6;
const ANGLE_STEP = 1e-7;

function vecBlock(name: FreeQuantity, get: (r: Rig) => Vec3, set: (r: Rig, v: Vec3) => void): Block {
  return {
    name,
    kind: 'length',
    components: [0, 1, 2].map((i) => `${name}[${i}]`),
    step: LENGTH_STEP,
    read: (r) => [...get(r)],
    write: (r, p, at) => set(r, [p[at], p[at + 1], p[at + 2]]),
    value: (r) => [...get(r)],
  };
}

function scalarBlock(name: FreeQuantity, kind: QuantityKind, step: number, get: (r: Rig) => number, set: (r: Rig, v: number) => void): Block {
  return { name, kind, components: [name], step, read: (r) => [get(r)], write: (r, p, at) => set(r, p[at]), value: (r) => [get(r)] };
}

/** The aim as azimuth and elevation of lookAt − position (DESIGN.md azimuth convention), and its length. */
function aimOf(rig: Rig): { az: number; el: number; d: number } {
  const f = sub(rig.projector.lookAt, rig.projector.position);
  const d = length(f);
  const [az, el] = azAltFromDirection(normalize(f));
  return { az, el, d };
}

function makeBlocks(base: Rig, free: readonly FreeQuantity[]): Block[] {
  const aimDistance = aimOf(base).d;
  const all: Record<FreeQuantity, () => Block> = {
    'mirror.center': () => vecBlock('mirror.center', (r) => r.mirror.center, (r, v) => (r.mirror.center = v)),
    'mirror.radius': () => scalarBlock('mirror.radius', 'length', LENGTH_STEP, (r) => r.mirror.radius, (r, v) => (r.mirror.radius = v)),
    'projector.position': () => vecBlock('projector.position', (r) => r.projector.position, (r, v) => (r.projector.position = v)),
    // The aim as two angles: a lookAt point has a third, meaningless freedom along the optical axis.
    'projector.lookAt': () => ({
      name: 'projector.lookAt',
      kind: 'length',
      components: ['projector.lookAt (aim azimuth)', 'projector.lookAt (aim elevation)'],
      step: ANGLE_STEP,
      read: (r) => {
        const a = aimOf(r);
        return [a.az, a.el];
      },
      write: (r, p, at) => {
        const d = directionFromAzAlt(p[at], p[at + 1]);
        const P = r.projector.position;
        r.projector.lookAt = [P[0] + aimDistance * d[0], P[1] + aimDistance * d[1], P[2] + aimDistance * d[2]];
      },
      value: (r) => [...r.projector.lookAt],
    }),
    'projector.roll': () => scalarBlock('projector.roll', 'angle', ANGLE_STEP, (r) => r.projector.roll, (r, v) => (r.projector.roll = v)),
    'projector.throwRatio': () => scalarBlock('projector.throwRatio', 'number', ANGLE_STEP, (r) => r.projector.throwRatio, (r, v) => (r.projector.throwRatio = v)),
    'projector.lensShift': () => ({
      name: 'projector.lensShift',
      kind: 'number',
      components: ['projector.lensShift[0]', 'projector.lensShift[1]'],
      step: ANGLE_STEP,
      read: (r) => [...r.projector.lensShift],
      write: (r, p, at) => (r.projector.lensShift = [p[at], p[at + 1]]),
      value: (r) => [...r.projector.lensShift],
    }),
    'dome.radius': () => scalarBlock('dome.radius', 'length', LENGTH_STEP, (r) => r.dome.radius, (r, v) => (r.dome.radius = v)),
  };
  // the solver's order puts projector.position before projector.lookAt, which hangs its aim on it
  return FREE_QUANTITIES.filter((q) => free.includes(q)).map((q) => all[q]());
}

function blockSize(b: Block): number {
  return b.components.length;
}

/** The rig for parameter vector p, or null when that rig cannot work. */
function rigAt(base: Rig, blocks: readonly Block[], p: ArrayLike<number>): Rig | null {
  const rig = cloneRig(base);
  let at = 0;
  for (const b of blocks) {
    b.write(rig, p, at);
    at += blockSize(b);
  }
  for (let i = 0; i < p.length; i++) if (!Number.isFinite(p[i])) return null;
  try {
    validateRigGeometry(rig);
  } catch {
    return null;
  }
  return rig;
}

// ---------------------------------------------------------------------------------------------
// The model of each item.

function pointPosition(rig: Rig, p: PointRef): Vec3 {
  const R = rig.dome.radius;
  switch (p.kind) {
    case 'mirror.pole':
      return mirrorPole(rig.mirror);
    case 'projector.lens':
      return [...rig.projector.position];
    case 'zenith':
      return onMesh(rig, [0, 0, 1]) ?? [0, 0, R];
    case 'rim': {
      const d: Vec3 = [Math.sin(p.azimuth), Math.cos(p.azimuth), 0];
      return onMesh(rig, d) ?? [R * d[0], R * d[1], 0];
    }
    case 'floor':
      throw new Error('floor is a plane, not a point');
  }
}

/**
 * On an as-built dome, the mesh point seen from the springline centre along unit d (where a tape to
 * "zenith" or "rim@AZ" ends), or undefined on a sphere or where the mesh has an opening.
 */
function onMesh(rig: Rig, d: Vec3): Vec3 | undefined {
  const mesh = rig.dome.mesh;
  if (!mesh) return undefined;
  // a hair above the springline, so a ring of vertices exactly at z = 0 is met
  const o: Vec3 = [0, 0, d[2] === 0 ? 1e-9 : 0];
  const s = mesh.firstHit(o, d);
  return s < 0 ? undefined : [o[0] + s * d[0], o[1] + s * d[1], o[2] + s * d[2]];
}

/** The rig's value of a tape distance, metres. */
export function modelDistance(rig: Rig, m: Pick<DistanceMeasurement, 'between'>): number {
  const [a, b] = m.between;
  if (a.kind === 'floor' || b.kind === 'floor') {
    const other = a.kind === 'floor' ? b : a;
    return pointPosition(rig, other)[2] + (rig.dome.floor ?? Number.NaN);
  }
  return length(sub(pointPosition(rig, a), pointPosition(rig, b)));
}

/** Unit direction from the content's eye to where an observation was seen. */
export function observedDirection(rig: Rig, o: Pick<Observation, 'target'>): Vec3 {
  const t = o.target;
  if (t.kind === 'direction') return directionFromAzAlt(t.azimuth, t.altitude);
  const P = pointPosition(rig, t.kind === 'zenith' ? { kind: 'zenith' } : { kind: 'rim', azimuth: t.azimuth });
  return normalize(sub(P, rig.content.eye));
}

/**
 * The direction from the eye that pixel (x, y) lights, continued where the pixel misses the mirror so
 * that the fit is steered back: off the cap, the whole sphere reflects; past the silhouette, the
 * reflection goes on through grazing to bending the other way. With impact parameter p (the ray's
 * distance from the centre) a hit has normal n = −c·d + (p/r)·n⊥, c = √(1 − (p/r)²), which bends the
 * ray by an angle that falls to zero at grazing (p = r); beyond it we take c = −√((p/r)² − 1) at the
 * closest approach, so the bend turns negative and grows again. The direction is continuous at the
 * silhouette and a miss never sits on a flat plateau where the solver would leave it. Writes the unit
 * direction to `out`; returns true when the pixel really hits the reflective cap.
 */
export function extendedPixelDirection(rig: Rig, frame: ProjectorFrame, x: number, y: number, out: Vec3): boolean {
  const ray = pixelToRay([0, 0, 0], frame, x, y);
  const P = frame.origin;
  const { mirror } = rig;
  const C = mirror.center;
  const r = mirror.radius;
  const t = raySphereFirstHit(P, ray, C, r);
  let o: Vec3 = P;
  let d: Vec3 = ray;
  let onMirror = false;
  if (t >= 0) {
    const X: Vec3 = [P[0] + t * ray[0], P[1] + t * ray[1], P[2] + t * ray[2]];
    onMirror = onCap(mirror, X);
    const n: Vec3 = [(X[0] - C[0]) / r, (X[1] - C[1]) / r, (X[2] - C[2]) / r];
    const k = 2 * dot(ray, n);
    o = X;
    d = [ray[0] - k * n[0], ray[1] - k * n[1], ray[2] - k * n[2]];
  } else {
    const tca = (C[0] - P[0]) * ray[0] + (C[1] - P[1]) * ray[1] + (C[2] - P[2]) * ray[2];
    if (tca > 0) {
      // passes the sphere by: continue the reflection law past grazing, at the closest approach
      const Q: Vec3 = [P[0] + tca * ray[0], P[1] + tca * ray[1], P[2] + tca * ray[2]];
      const perp = sub(Q, C);
      const pl = length(perp);
      const c = -Math.sqrt(Math.min(1, Math.max(0, (pl / r) ** 2 - 1)));
      const sn = Math.sqrt(1 - c * c);
      const n: Vec3 = [-c * ray[0] + (sn * perp[0]) / pl, -c * ray[1] + (sn * perp[1]) / pl, -c * ray[2] + (sn * perp[2]) / pl];
      const k = 2 * dot(ray, n);
      o = Q;
      d = [ray[0] - k * n[0], ray[1] - k * n[1], ray[2] - k * n[2]];
    }
  }
  // on an as-built dome the mesh where the light meets it, else (an opening, a miss) the nominal sphere
  const sm = onMirror && rig.dome.mesh ? rig.dome.mesh.firstHit(o, d) : -1;
  const s = sm >= 0 ? sm : Math.max(0, rayDomeExit(o, d, rig.dome.radius));
  const e = rig.content.eye;
  const w = normalize([o[0] + s * d[0] - e[0], o[1] + s * d[1] - e[1], o[2] + s * d[2] - e[2]]);
  out[0] = w[0];
  out[1] = w[1];
  out[2] = w[2];
  return onMirror;
}

/** Two unit vectors spanning the tangent plane at unit o (fixed for a given o): e1 = unit(helper × o), e2 = o × e1. */
function tangentBasis(o: ReadonlyVec3): [Vec3, Vec3] {
  const helper: ReadonlyVec3 = Math.abs(o[2]) < 0.9 ? [0, 0, 1] : [0, 1, 0];
  const e1: Vec3 = [0, 0, 0];
  vec3.normalize(e1, vec3.cross(e1, helper, o));
  const e2: Vec3 = [0, 0, 0];
  vec3.cross(e2, o, e1);
  return [e1, e2];
}

/**
 * The logarithmic map of unit w at unit o: the tangent vector at o, in the basis (e1, e2), whose
 * length is the angle from o to w and whose direction points toward w.
 */
export function logMap(o: ReadonlyVec3, w: ReadonlyVec3): [number, number] {
  const [e1, e2] = tangentBasis(o);
  const c = dot(w, o);
  const p: Vec3 = [w[0] - c * o[0], w[1] - c * o[1], w[2] - c * o[2]];
  const s = length(p);
  const theta = Math.atan2(s, c);
  const k = s > 1e-300 ? theta / s : 1;
  return [k * dot(p, e1), k * dot(p, e2)];
}

interface Model {
  rig: Rig;
  set: MeasurementSet;
  /** Normalized residual components: one per distance, then two per observation. */
  residuals(rig: Rig): Float64Array;
  equations: number;
}

function makeModel(set: MeasurementSet): Omit<Model, 'rig'> {
  const nd = set.measurements.length;
  const equations = nd + 2 * set.observations.length;
  const w: Vec3 = [0, 0, 0];
  return {
    set,
    equations,
    residuals(rig: Rig): Float64Array {
      const r = new Float64Array(equations);
      set.measurements.forEach((m, k) => {
        r[k] = (modelDistance(rig, m) - m.distance) / m.sigma;
      });
      const frame = projectorFrame(rig.projector);
      set.observations.forEach((o, k) => {
        extendedPixelDirection(rig, frame, o.pixel[0], o.pixel[1], w);
        const [a, b] = logMap(observedDirection(rig, o), w);
        r[nd + 2 * k] = a / o.sigma;
        r[nd + 2 * k + 1] = b / o.sigma;
      });
      return r;
    },
  };
}

/** Per-item residual details for a rig, with robust weights per item. */
function describeResiduals(rig: Rig, set: MeasurementSet, weights: readonly number[]): FitResidual[] {
  const out: FitResidual[] = [];
  set.measurements.forEach((m, k) => {
    const model = modelDistance(rig, m);
    const residual = model - m.distance;
    out.push({ kind: 'distance', field: m.field, label: m.label, measured: m.distance, model, residual, sigma: m.sigma, normalized: residual / m.sigma, weight: weights[k] ?? 1 });
  });
  const frame = projectorFrame(rig.projector);
  const nd = set.measurements.length;
  set.observations.forEach((o, k) => {
    const w: Vec3 = [0, 0, 0];
    const onMirror = extendedPixelDirection(rig, frame, o.pixel[0], o.pixel[1], w);
    const obs = observedDirection(rig, o);
    const [la, lb] = logMap(obs, w);
    const angle = Math.hypot(la, lb);
    out.push({
      kind: 'observation',
      field: o.field,
      label: o.label,
      pixel: [o.pixel[0], o.pixel[1]],
      observed: azAltFromDirection(obs),
      model: azAltFromDirection(w),
      onMirror,
      angle,
      sigma: o.sigma,
      normalized: angle / o.sigma,
      weight: weights[nd + k] ?? 1,
    });
  });
  return out;
}

function summarize(res: readonly FitResidual[]): FitSummary {
  let s2 = 0;
  let n = 0;
  let d2 = 0;
  let nd = 0;
  let a2 = 0;
  let na = 0;
  for (const r of res) {
    if (r.kind === 'distance') {
      s2 += r.normalized ** 2;
      n += 1;
      d2 += r.residual ** 2;
      nd++;
    } else {
      s2 += r.normalized ** 2;
      n += 2;
      a2 += r.angle ** 2;
      na++;
    }
  }
  return { rms: n ? Math.sqrt(s2 / n) : 0, rmsDistance: nd ? Math.sqrt(d2 / nd) : null, rmsAngle: na ? Math.sqrt(a2 / na) : null };
}

// ---------------------------------------------------------------------------------------------

function checkInputs(rig: Rig, set: MeasurementSet, free: readonly FreeQuantity[], blocks: readonly Block[]): void {
  if (free.length === 0) throw new RigError('free', `expected at least one rig quantity to solve (${FREE_QUANTITIES.join(', ')}), got none`);
  for (const m of set.measurements) {
    m.between.forEach((p, i) => {
      if (p.kind === 'floor' && rig.dome.floor === undefined) {
        throw new RigError(`${m.field}.between[${i}]`, 'expected dome.floor in the rig to measure to "floor", got a rig without it');
      }
    });
  }
  const [W, H] = rig.projector.resolution;
  for (const o of set.observations) {
    const [x, y] = o.pixel;
    if (!(x >= 0 && x <= W && y >= 0 && y <= H)) throw new RigError(`${o.field}.pixel`, `expected a pixel inside the ${W} × ${H} frame, got [${x}, ${y}]`);
  }
  const unknowns = blocks.reduce((s, b) => s + blockSize(b), 0);
  const equations = set.measurements.length + 2 * set.observations.length;
  if (equations < unknowns) {
    const which = blocks.map((b) => `${b.name} (${blockSize(b)})`).join(', ');
    throw new RigError(
      'free',
      `fewer equations than unknowns: expected at least ${unknowns} equations for ${which}, got ${equations} (${set.measurements.length} distances, ${set.observations.length} observations × 2)`,
    );
  }
}

function huberWeight(u: number, k: number): number {
  return u <= k ? 1 : k / u;
}

/** Per-item robust weights from the normalized residual vector (observations weigh their 2-vector's length). */
function itemWeights(r: Float64Array, nd: number, no: number, k: number): number[] {
  const w: number[] = [];
  for (let i = 0; i < nd; i++) w.push(huberWeight(Math.abs(r[i]), k));
  for (let i = 0; i < no; i++) w.push(huberWeight(Math.hypot(r[nd + 2 * i], r[nd + 2 * i + 1]), k));
  return w;
}

function expandWeights(w: readonly number[], nd: number, no: number): Float64Array {
  const s = new Float64Array(nd + 2 * no);
  for (let i = 0; i < nd; i++) s[i] = Math.sqrt(w[i]);
  for (let i = 0; i < no; i++) s[nd + 2 * i] = s[nd + 2 * i + 1] = Math.sqrt(w[nd + i]);
  return s;
}

/**
 * Starting points from trilateration: where three or more tapes run from the mirror's pole (or the
 * lens) to fixed dome points, the closed-form intersection refined by least squares places that
 * point directly. Kept only when it lowers the total misfit.
 */
function trilaterationSeed(base: Rig, set: MeasurementSet, blocks: readonly Block[], p: Float64Array, cost: (p: Float64Array) => number, notes: Notice[]): Float64Array {
  const targets: { point: 'mirror.pole' | 'projector.lens'; block: FreeQuantity }[] = [
    { point: 'mirror.pole', block: 'mirror.center' },
    { point: 'projector.lens', block: 'projector.position' },
  ];
  let best = p;
  let bestCost = cost(p);
  for (const t of targets) {
    const bi = blocks.findIndex((b) => b.name === t.block);
    if (bi < 0) continue;
    const current = rigAt(base, blocks, best);
    if (!current) continue;
    const anchors: Vec3[] = [];
    const dists: number[] = [];
    for (const m of set.measurements) {
      const [a, b] = m.between;
      const other = a.kind === t.point ? b : b.kind === t.point ? a : null;
      if (other && (other.kind === 'rim' || other.kind === 'zenith')) {
        anchors.push(pointPosition(current, other));
        dists.push(m.distance);
      }
    }
    if (anchors.length < 3) continue;
    const here = pointPosition(current, { kind: t.point });
    const found = locatePoint(anchors, dists, here);
    if (!found) continue;
    const offset = sub(found.point, here);
    const q = Float64Array.from(best);
    const at = blocks.slice(0, bi).reduce((s, b) => s + blockSize(b), 0);
    for (let i = 0; i < 3; i++) q[at + i] += offset[i];
    const c = cost(q);
    if (c < bestCost) {
      best = q;
      bestCost = c;
      notes.push(notice('fit.trilateration-start', `${t.point} placed by trilateration from ${anchors.length} distances (${pointLabelList(set, t.point)}) as the starting point`, { parameter: t.block }));
    }
  }
  return best;
}

function pointLabelList(set: MeasurementSet, point: string): string {
  return set.measurements
    .filter((m) => m.between.some((b) => b.kind === point) && m.between.some((b) => b.kind === 'rim' || b.kind === 'zenith'))
    .map((m) => pointLabel(m.between[0].kind === point ? m.between[1] : m.between[0]))
    .join(', ');
}

function joinNames(names: readonly string[]): string {
  return names.length <= 2 ? names.join(' and ') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

interface RankAnalysis {
  /** 1/√diag(JᵀJ) (0 for a column of zeros). */
  scale: Float64Array;
  eig: ReturnType<typeof symmetricEigen>;
  lmax: number;
  /** Unit null directions in scaled coordinates. */
  nullDirections: Float64Array[];
  degeneracies: Degeneracy[];
}

/**
 * The eigen-decomposition of JᵀJ scaled to a unit diagonal (a correlation-like matrix, so units do not
 * matter): eigenvalues below RANK_TOLERANCE·λmax are directions the data cannot see at all, below
 * WEAK_TOLERANCE·λmax ones it barely sees; each is named by the components with a large share of it.
 */
function rankAnalysis(J: Float64Array, m: number, n: number, blocks: readonly Block[], where: 'start' | 'solution'): RankAnalysis {
  const { JtJ } = normalEquations(J, null, m, n);
  const scale = new Float64Array(n);
  const dead: number[] = [];
  for (let i = 0; i < n; i++) {
    const d = JtJ[i * n + i];
    if (d > 0) scale[i] = 1 / Math.sqrt(d);
    else dead.push(i);
  }
  const C = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) C[i * n + j] = JtJ[i * n + j] * scale[i] * scale[j];
  const eig = symmetricEigen(C, n);
  const lmax = Math.max(1e-300, eig.values[n - 1]);
  const componentNames = blocks.flatMap((b) => b.components);
  const componentBlock = blocks.flatMap((b) => b.components.map(() => b.name));
  const nullDirections: Float64Array[] = [];
  const degeneracies: Degeneracy[] = [];
  const at = where === 'start' ? ' at the starting rig' : '';
  for (let k = 0; k < n; k++) {
    const rel = eig.values[k] / lmax;
    if (rel >= WEAK_TOLERANCE) continue;
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) v[i] = eig.vectors[i * n + k];
    const severity = rel < RANK_TOLERANCE ? 'undetermined' : 'weak';
    if (severity === 'undetermined') nullDirections.push(v);
    const order = Array.from({ length: n }, (_, i) => i)
      .filter((i) => Math.abs(v[i]) >= 0.2)
      .sort((a, b) => Math.abs(v[b]) - Math.abs(v[a]));
    const quantities = [...new Set(order.map((i) => componentBlock[i]))];
    const components = order.map((i) => componentNames[i]);
    const inflation = severity === 'undetermined' ? Number.POSITIVE_INFINITY : 1 / Math.sqrt(rel);
    const names = joinNames(quantities);
    const message =
      severity === 'undetermined'
        ? quantities.length > 1
          ? `${names} cannot be told apart with these measurements and points${at} (${components.join(', ')} move together); measure more, or keep some of them fixed`
          : `${names} cannot be determined from these measurements and points${at} (${components.join(', ')}); measure more, or keep it fixed`
        : quantities.length > 1
          ? `${names} can barely be told apart with these measurements and points${at} (${components.join(', ')}; standard errors inflated about ×${inflation.toPrecision(2)})`
          : `${names} is barely determined by these measurements and points${at} (standard errors inflated about ×${inflation.toPrecision(2)})`;
    degeneracies.push({ quantities, components, severity, inflation, where, message });
  }
  for (const i of dead) {
    if (nullDirections.some((v) => Math.abs(v[i]) > 0.5)) continue;
    const v = new Float64Array(n);
    v[i] = 1;
    nullDirections.push(v);
  }
  return { scale, eig, lmax, nullDirections, degeneracies };
}

/** The least-squares problem of one fit: the parameter blocks, the model and their sizes. */
interface FitProblem {
  base: Rig;
  set: MeasurementSet;
  blocks: readonly Block[];
  /** Distances, observations. */
  distances: number;
  observations: number;
  equations: number;
  unknowns: number;
  steps: number[];
  /** Unweighted normalized residuals at q; null where q gives no working rig. */
  residuals: (q: Float64Array) => Float64Array | null;
  /** Σ r² of the unweighted residuals (Infinity where q gives no working rig). */
  sumOfSquares: (q: Float64Array) => number;
}

function fitProblem(base: Rig, set: MeasurementSet, blocks: readonly Block[]): FitProblem {
  const model = makeModel(set);
  const residuals = (q: Float64Array): Float64Array | null => {
    const r = rigAt(base, blocks, q);
    return r ? model.residuals(r) : null;
  };
  return {
    base,
    set,
    blocks,
    distances: set.measurements.length,
    observations: set.observations.length,
    equations: model.equations,
    unknowns: blocks.reduce((s, b) => s + blockSize(b), 0),
    steps: blocks.flatMap((b) => b.components.map(() => b.step)),
    residuals,
    sumOfSquares: (q) => {
      const r = residuals(q);
      return r ? r.reduce((s, x) => s + x * x, 0) : Infinity;
    },
  };
}

interface Solution {
  fit: ReturnType<typeof levenbergMarquardt>;
  /** Robust weight per item (distances, then observations); all 1 without reweighting. */
  weights: number[];
  iterations: number;
  converged: boolean;
}

/** Plain weighted least squares from p. */
function solve(problem: FitProblem, p: Float64Array, maxIterations: number): Solution {
  const fit = levenbergMarquardt({ n: problem.unknowns, steps: problem.steps, residuals: problem.residuals }, p, { maxIterations });
  return { fit, weights: new Array<number>(problem.distances + problem.observations).fill(1), iterations: fit.iterations, converged: fit.converged };
}

/** Huber reweighting rounds after the plain solve, until the weights settle (at most 30 rounds). */
function robustReweighting(problem: FitProblem, plain: Solution, huberK: number, maxIterations: number, notes: Notice[]): Solution {
  const { distances: nd, observations: no } = problem;
  let { fit, weights, iterations, converged } = plain;
  let rounds = 0;
  for (; rounds < 30; rounds++) {
    const raw = problem.residuals(fit.p)!;
    const next = itemWeights(raw, nd, no, huberK);
    const change = next.reduce((m, w, i) => Math.max(m, Math.abs(w - weights[i])), 0);
    weights = next;
    if (change < 1e-4 && rounds > 0) break;
    const sw = expandWeights(weights, nd, no);
    const weighted = (q: Float64Array): Float64Array | null => {
      const r = problem.residuals(q);
      if (!r) return null;
      for (let i = 0; i < r.length; i++) r[i] *= sw[i];
      return r;
    };
    fit = levenbergMarquardt({ n: problem.unknowns, steps: problem.steps, residuals: weighted }, fit.p, { maxIterations });
    iterations += fit.iterations;
    converged = fit.converged;
  }
  notes.push(notice('fit.robust-rounds', `robust (Huber, k = ${huberK}): ${rounds + 1} reweighting rounds`));
  return { fit, weights, iterations, converged };
}

/**
 * The solution's rank analysis joined with the start's: a direction the data cannot see is exact
 * before the solver wanders along it, so what was invisible at the start stays undetermined, carried
 * into the solution's scaling.
 */
function joinRankAnalyses(solution: RankAnalysis, start: RankAnalysis, n: number): RankAnalysis {
  const degeneracies = [...solution.degeneracies];
  for (const d of start.degeneracies) {
    if (!degeneracies.some((e) => e.quantities.join() === d.quantities.join() && e.severity === d.severity)) degeneracies.push(d);
  }
  const nullDirections = [...solution.nullDirections];
  const scale = solution.scale;
  for (const v of start.nullDirections) {
    const u = new Float64Array(n);
    for (let i = 0; i < n; i++) u[i] = scale[i] > 0 ? (v[i] * (start.scale[i] || 1)) / scale[i] : v[i];
    const l = Math.hypot(...u);
    if (l > 0) nullDirections.push(u.map((x) => x / l));
  }
  return { ...solution, degeneracies, nullDirections };
}

/**
 * Cov = s²·S·C⁺·S, with C⁺ the pseudo-inverse of the scaled normal matrix over its determined
 * directions and s² = cost/(m − n) the variance factor (1 without redundancy).
 */
function covariance(rank: RankAnalysis, cost: number, m: number, n: number): { cov: Float64Array; varianceFactor: number } {
  const { scale, eig, lmax } = rank;
  const dof = m - n;
  const varianceFactor = dof > 0 ? cost / dof : 1;
  const Cplus = new Float64Array(n * n);
  for (let k = 0; k < n; k++) {
    if (eig.values[k] / lmax < RANK_TOLERANCE) continue;
    const inv = 1 / eig.values[k];
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) Cplus[i * n + j] += eig.vectors[i * n + k] * eig.vectors[j * n + k] * inv;
  }
  const cov = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) cov[i * n + j] = varianceFactor * scale[i] * scale[j] * Cplus[i * n + j];
  return { cov, varianceFactor };
}

/** d(block value)/dp at p by central differences (one-sided where one side gives no working rig). */
function valueGradient(problem: FitProblem, block: Block, p: Float64Array, value: readonly number[]): number[][] {
  const { base, blocks, steps, unknowns: n } = problem;
  const G: number[][] = value.map(() => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    const q = Float64Array.from(p);
    q[j] = p[j] + steps[j];
    const rp = rigAt(base, blocks, q);
    q[j] = p[j] - steps[j];
    const rm = rigAt(base, blocks, q);
    if (rp && rm) {
      const vp = block.value(rp);
      const vm = block.value(rm);
      for (let c = 0; c < value.length; c++) G[c][j] = (vp[c] - vm[c]) / (2 * steps[j]);
    } else if (rp || rm) {
      const v1 = block.value((rp ?? rm)!);
      const sgn = rp ? 1 : -1;
      for (let c = 0; c < value.length; c++) G[c][j] = (sgn * (v1[c] - value[c])) / steps[j];
    }
  }
  return G;
}

/**
 * The standard error of a quantity whose gradient in p is `row`: √(row·Cov·rowᵀ), or null when it moves
 * along a direction the data cannot see.
 */
function standardError(row: ArrayLike<number>, cov: Float64Array, rank: RankAnalysis, n: number): number | null {
  const { scale, nullDirections } = rank;
  let norm = 0;
  for (let j = 0; j < n; j++) norm += (row[j] * (scale[j] || 1)) ** 2;
  norm = Math.sqrt(norm);
  for (const v of nullDirections) {
    let proj = 0;
    for (let j = 0; j < n; j++) proj += row[j] * (scale[j] || 1) * v[j];
    if (norm > 0 && Math.abs(proj) > 0.05 * norm) return null;
  }
  let s = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) s += row[i] * cov[i * n + j] * row[j];
  return Math.sqrt(Math.max(0, s));
}

/** Each quantity's person-facing value and its standard errors, by propagating Cov through it. */
function propagateErrors(problem: FitProblem, p: Float64Array, fitted: Rig, cov: Float64Array, rank: RankAnalysis): FitParameter[] {
  const n = problem.unknowns;
  const parameters: FitParameter[] = [];
  let at = 0;
  for (const b of problem.blocks) {
    const value = b.value(fitted);
    const stderr = valueGradient(problem, b, p, value).map((row) => standardError(row, cov, rank, n));
    const param: FitParameter = { name: b.name, kind: b.kind, initial: b.value(problem.base), value, stderr };
    if (b.name === 'projector.lookAt') {
      param.aimStderr = [0, 1].map((c) => {
        const row = new Float64Array(n);
        row[at + c] = 1;
        return standardError(row, cov, rank, n);
      });
    }
    parameters.push(param);
    at += blockSize(b);
  }
  return parameters;
}

function worstResidual(residuals: readonly FitResidual[]): FitResidual | null {
  let worst: FitResidual | null = null;
  for (const r of residuals) if (!worst || Math.abs(r.normalized) > Math.abs(worst.normalized)) worst = r;
  return worst;
}

/** Warnings about the starting rig: observations whose pixel misses the mirror there. */
function startWarnings(initialResiduals: readonly FitResidual[]): Notice[] {
  const warnings: Notice[] = [];
  for (const r of initialResiduals) {
    if (r.kind === 'observation' && !r.onMirror) {
      const text = `${r.field}: pixel ${r.pixel.join(',')} misses the mirror in the starting rig; the fit steers it back by continuing the reflection past the mirror's edge`;
      warnings.push(notice('fit.start-misses-mirror', text, { parameter: r.field }));
    }
  }
  return warnings;
}

/** Warnings about the solution: items that miss, disagree or stand out; a fit with no redundancy. */
function solutionWarnings(residuals: readonly FitResidual[], worst: FitResidual | null, robust: boolean, dof: number): Notice[] {
  const warnings: Notice[] = [];
  if (dof === 0) warnings.push(notice('fit.no-redundancy', 'as many equations as unknowns: no redundancy to check the fit against; standard errors assume the stated sigmas'));
  for (const r of residuals) {
    if (r.kind === 'observation' && !r.onMirror) {
      warnings.push(notice('fit.misses-mirror', `${r.field}: pixel ${r.pixel.join(',')} misses the mirror in the fitted rig: check that observation`, { parameter: r.field }));
    }
  }
  if (robust) {
    for (const r of residuals) {
      if (r.weight >= 0.5) continue;
      const text = `${r.field} (${r.label}) disagrees with the rest: ${Math.abs(r.normalized).toFixed(1)} sigma off, down-weighted to ${r.weight.toFixed(2)}`;
      warnings.push(notice('fit.down-weighted', text, { parameter: r.field }));
    }
  } else if (worst && Math.abs(worst.normalized) > 3 && dof > 0) {
    const text = `${worst.field} (${worst.label}) is ${Math.abs(worst.normalized).toFixed(1)} sigma off: check that reading, or try {option:robust}`;
    warnings.push(notice('fit.outlier', text, { parameter: worst.field }));
  }
  return warnings;
}

/**
 * Solves the free quantities of `rig` from a measurement set. Throws RigError (naming the measurement
 * field) for inputs that cannot be fitted: no free quantity, fewer equations than unknowns, a pixel
 * outside the frame, a floor distance without dome.floor.
 */
export function fitRig(rig: Rig, set: MeasurementSet, options: Partial<FitOptions> = {}): FitResult {
  const o = { ...FIT_DEFAULTS, ...options };
  const free = o.free ?? set.free;
  const blocks = makeBlocks(rig, free);
  checkInputs(rig, set, free, blocks);
  validateRigGeometry(rig);
  const problem = fitProblem(rig, set, blocks);
  const { equations: m, unknowns: n } = problem;
  const notes: Notice[] = [];

  const initialResiduals = describeResiduals(rig, set, []);
  let p: Float64Array = Float64Array.from(blocks.flatMap((b) => b.read(rig)));
  if (o.trilaterate) p = trilaterationSeed(rig, set, blocks, p, problem.sumOfSquares, notes);
  const startJacobian = numericJacobian({ n, steps: problem.steps, residuals: problem.residuals }, p, problem.residuals(p)!);
  const startRank = rankAnalysis(startJacobian, m, n, blocks, 'start');

  const plain = solve(problem, p, o.maxIterations);
  const solution = o.robust ? robustReweighting(problem, plain, o.huberK, o.maxIterations, notes) : plain;
  const { fit } = solution;
  const fitted = rigAt(rig, blocks, fit.p)!;

  // covariance and rank from the weighted Jacobian at the solution
  const rank = joinRankAnalyses(rankAnalysis(fit.jacobian, m, n, blocks, 'solution'), startRank, n);
  const { cov, varianceFactor } = covariance(rank, fit.cost, m, n);
  const parameters = propagateErrors(problem, fit.p, fitted, cov, rank);

  const residuals = describeResiduals(fitted, set, solution.weights);
  const worst = worstResidual(residuals);
  const warnings = [
    ...startWarnings(initialResiduals),
    ...(solution.converged ? [] : [notice('fit.not-converged', `the solver stopped before converging (${fit.reason}); the result may not be the best fit`)]),
    ...rank.degeneracies.map((d) => notice(`fit.${d.severity}`, d.message, { parameter: d.quantities[0] })),
    ...solutionWarnings(residuals, worst, o.robust, m - n),
  ];

  return {
    rig: fitted,
    initialRig: rig,
    free: blocks.map((b) => b.name),
    before: summarize(initialResiduals),
    after: summarize(residuals),
    residuals,
    initialResiduals,
    parameters,
    worst,
    degeneracies: rank.degeneracies,
    warnings,
    notes,
    equations: m,
    unknowns: n,
    varianceFactor,
    iterations: solution.iterations,
    converged: solution.converged,
  };
}
