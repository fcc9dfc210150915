/**
 * Calibration: the small linear algebra, trilateration against closed forms, measurement documents
 * with their exact error messages, and `fitRig` on synthetic ground truth (seeded noise of 0.2° and
 * 5 mm, the "realistic" figures): the fitted warp lands near the truth, standard errors are
 * honest, one bad reading is caught by the robust fit, and degenerate sets are named.
 */
import { describe, expect, it } from 'vitest';
import { angleBetween, azAltFromDirection, cross, DEG, normalize, RAD, type Vec3 } from '../src/math.js';
import { choleskySolve, symmetricEigen } from '../src/calibrate/matrix.js';
import { extendedPixelDirection, fitRig, logMap, modelDistance } from '../src/calibrate/fit.js';
import { levenbergMarquardt } from '../src/calibrate/levenberg-marquardt.js';
import { locateDirection } from '../src/locate.js';
import { locatePoint, trilaterate, trilaterateLeastSquares } from '../src/calibrate/trilaterate.js';
import { measurementsFromDocument, type FreeQuantity, type MeasurementSet, type Observation, type PointRef } from '../src/calibrate/measurements.js';
import { projectorFrame } from '../src/optics/projector.js';
import { RigError, validateRigGeometry, type Rig } from '../src/rig/model.js';
import { rigFromDocument } from '../src/rig/document.js';
import { Tracer } from '../src/trace.js';

/** The demo rig of `skyfold init` (packages/warp-cli/src/demo-rig.ts), written out here. */
const DEMO_DOC = {
  units: 'm',
  dome: { diameter: 5, floor: 0.5 },
  mirror: { radius: 0.3, center: [0, -1.95, 0.15], axis: [0, 1, 1], capAngle: 90 },
  projector: { position: [0, -0.75, 0.1], lookAt: [0, -1.95, 0.25], roll: 0, resolution: [1920, 1200], throwRatio: 1.6, lensShift: [0, 0] },
  content: { fov: 180, eye: [0, 0, 0] },
};
const nominal = (): Rig => rigFromDocument(structuredClone(DEMO_DOC));

/** mulberry32: a small seeded generator, so every run sees the same noise. */
function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A standard normal deviate (Box–Muller). */
function gauss(r: () => number): number {
  return Math.sqrt(-2 * Math.log(1 - r())) * Math.cos(2 * Math.PI * r());
}

const uniform = (r: () => number, half: number) => half * (2 * r() - 1);

/** The demo rig moved by a few centimetres and degrees: the "truth" the operator does not know. */
function perturbed(r: () => number): Rig {
  const t = nominal();
  t.mirror.center = t.mirror.center.map((x) => x + uniform(r, 0.03)) as Vec3;
  t.projector.position = t.projector.position.map((x) => x + uniform(r, 0.03)) as Vec3;
  t.projector.lookAt = t.projector.lookAt.map((x) => x + uniform(r, 0.04)) as Vec3;
  t.projector.roll += uniform(r, 2 * DEG);
  t.projector.throwRatio *= 1 + uniform(r, 0.02);
  validateRigGeometry(t);
  return t;
}

const P = (kind: 'mirror.pole' | 'projector.lens' | 'zenith' | 'floor'): PointRef => ({ kind });
const rim = (az: number): PointRef => ({ kind: 'rim', azimuth: az * DEG });

/** The tape distances an operator would take in the demo dome. */
const TAPES: [PointRef, PointRef][] = [
  [P('mirror.pole'), rim(0)],
  [P('mirror.pole'), rim(90)],
  [P('mirror.pole'), rim(270)],
  [P('mirror.pole'), P('zenith')],
  [P('mirror.pole'), P('floor')],
  [P('projector.lens'), P('mirror.pole')],
  [P('projector.lens'), P('floor')],
  [P('projector.lens'), rim(0)],
  [P('projector.lens'), rim(90)],
  [P('projector.lens'), rim(270)],
];

/** A direction off by a normal deviate of `sigma` (radians) along each of two tangent axes. */
function noisy(d: Vec3, sigma: number, r: () => number): Vec3 {
  const e1 = normalize(cross([0, 0, 1], d));
  const e2 = cross(d, e1);
  const a = sigma * gauss(r);
  const b = sigma * gauss(r);
  return normalize([d[0] + a * e1[0] + b * e2[0], d[1] + a * e1[1] + b * e2[1], d[2] + a * e1[2] + b * e2[2]]);
}

/** Observations at `count` random pixels that reach the dome in the truth, with noise. */
function observe(truth: Rig, r: () => number, count: number, sigmaDeg = 0.2, pick?: () => [number, number]): Observation[] {
  const t = new Tracer(truth);
  const out: Observation[] = [];
  for (let guard = 0; out.length < count && guard < 10000; guard++) {
    const [x, y] = pick ? pick() : [Math.round(100 + r() * 1720), Math.round(100 + r() * 1000)];
    const h = t.pixel(x, y);
    if (h.kind !== 'dome' || h.altitude < 3 * DEG) continue;
    const [az, alt] = azAltFromDirection(noisy(h.direction, sigmaDeg * DEG, r));
    out.push({ pixel: [x, y], target: { kind: 'direction', azimuth: az, altitude: alt }, sigma: sigmaDeg * DEG, label: `${x},${y}`, field: `observations[${out.length}]` });
  }
  return out;
}

function tapes(truth: Rig, r: () => number, sigma = 0.005): MeasurementSet['measurements'] {
  return TAPES.map((between, k) => ({ between, distance: modelDistance(truth, { between }) + sigma * gauss(r), sigma, label: String(k), field: `measurements[${k}]` }));
}

const FREE: FreeQuantity[] = ['mirror.center', 'projector.position', 'projector.lookAt', 'projector.roll', 'projector.throwRatio'];

/** Angles (degrees) between where `a` and `b` send each pixel of a grid that reaches the dome in `a`. */
function landingErrors(a: Rig, b: Rig, step = 48): number[] {
  const ta = new Tracer(a);
  const tb = new Tracer(b);
  const errs: number[] = [];
  for (let y = step / 2; y < 1200; y += step) {
    for (let x = step / 2; x < 1920; x += step) {
      const ha = ta.pixel(x, y);
      const hb = tb.pixel(x, y);
      if (ha.kind !== 'dome' || hb.kind === 'mirror-miss') continue;
      errs.push(angleBetween(ha.direction, hb.direction) * RAD);
    }
  }
  return errs;
}

function percentile(xs: number[], q: number): number {
  const s = [...xs].sort((p, q2) => p - q2);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))];
}

// ---------------------------------------------------------------------------------------------

describe('matrix', () => {
  it('symmetricEigen returns an orthonormal basis with A·v = λ·v, ascending', () => {
    const r = seeded(7);
    const n = 6;
    const B = Array.from({ length: n * n }, () => gauss(r));
    const A = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) for (let k = 0; k < n; k++) A[i * n + j] += B[k * n + i] * B[k * n + j];
    const { values, vectors } = symmetricEigen(A, n);
    for (let k = 1; k < n; k++) expect(values[k]).toBeGreaterThanOrEqual(values[k - 1]);
    for (let k = 0; k < n; k++) {
      for (let i = 0; i < n; i++) {
        let av = 0;
        for (let j = 0; j < n; j++) av += A[i * n + j] * vectors[j * n + k];
        expect(av).toBeCloseTo(values[k] * vectors[i * n + k], 9);
      }
      for (let l = 0; l < n; l++) {
        let d = 0;
        for (let i = 0; i < n; i++) d += vectors[i * n + k] * vectors[i * n + l];
        expect(d).toBeCloseTo(k === l ? 1 : 0, 12);
      }
    }
  });

  it('symmetricEigen finds an exact null direction of a rank-deficient matrix', () => {
    // columns 0 and 2 of J equal: v = (1, 0, −1)/√2 is null
    const J = [1, 2, 1, 0, 1, 0, 3, -1, 3, 2, 2, 2];
    const n = 3;
    const A = new Float64Array(9);
    for (let k = 0; k < 4; k++) for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) A[i * n + j] += J[k * n + i] * J[k * n + j];
    const { values, vectors } = symmetricEigen(A, n);
    expect(Math.abs(values[0])).toBeLessThan(1e-12 * values[2]);
    expect(Math.abs(vectors[0] + vectors[6])).toBeLessThan(1e-9);
    expect(Math.abs(vectors[3])).toBeLessThan(1e-9);
  });

  it('choleskySolve solves SPD systems and refuses indefinite ones', () => {
    const A = Float64Array.from([4, 2, 0, 2, 5, 1, 0, 1, 3]);
    const x = choleskySolve(A, Float64Array.from([2, 3, 4]), 3)!;
    expect(4 * x[0] + 2 * x[1]).toBeCloseTo(2, 12);
    expect(2 * x[0] + 5 * x[1] + x[2]).toBeCloseTo(3, 12);
    expect(x[1] + 3 * x[2]).toBeCloseTo(4, 12);
    expect(choleskySolve(Float64Array.from([1, 2, 2, 1]), Float64Array.from([1, 1]), 2)).toBeNull();
  });

  it('levenbergMarquardt fits the Rosenbrock valley from the textbook start (−1.2, 1)', () => {
    // Rosenbrock as least squares: r = (10(y − x²), 1 − x); minimum at (1, 1) (Moré, Garbow & Hillstrom 1981, problem 1)
    const fit = levenbergMarquardt({ n: 2, steps: [1e-7, 1e-7], residuals: (p) => Float64Array.from([10 * (p[1] - p[0] * p[0]), 1 - p[0]]) }, [-1.2, 1]);
    expect(fit.converged).toBe(true);
    expect(fit.p[0]).toBeCloseTo(1, 6);
    expect(fit.p[1]).toBeCloseTo(1, 6);
  });

  it('levenbergMarquardt never steps into a refused region', () => {
    // minimum of (x − 3)² lies beyond the wall x ≤ 2: the solver stops at the wall, never past it
    let worst = -Infinity;
    const fit = levenbergMarquardt({ n: 1, steps: [1e-7], residuals: (p) => (p[0] > 2 ? null : (worst = Math.max(worst, p[0]), Float64Array.from([p[0] - 3]))) }, [0]);
    expect(worst).toBeLessThanOrEqual(2);
    expect(fit.p[0]).toBeGreaterThan(1.99);
  });
});

describe('trilateration', () => {
  const R = 2.5;
  const rimPoint = (az: number): Vec3 => [R * Math.sin(az * DEG), R * Math.cos(az * DEG), 0];
  const dist = (a: Vec3, b: Vec3) => Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
  const truth: Vec3 = [0.08, -1.74, 0.37]; // a mirror pole near the back of the demo dome

  it('three rim marks at 0°, 90°, 270°: matches the closed form worked by hand', () => {
    // Marks (0, R, 0), (R, 0, 0), (−R, 0, 0): d3² − d2² = 4Rx; |p|² = d2² + 2Rx − R²; y = (|p|² + R² − d1²)/2R;
    // z = √(|p|² − x² − y²) (sphere-intersection algebra, as in any surveying or geometry handbook)
    const [m1, m2, m3] = [rimPoint(0), rimPoint(90), rimPoint(270)];
    const [d1, d2, d3] = [dist(truth, m1), dist(truth, m2), dist(truth, m3)];
    const x = (d3 * d3 - d2 * d2) / (4 * R);
    const p2 = d2 * d2 + 2 * R * x - R * R;
    const y = (p2 + R * R - d1 * d1) / (2 * R);
    const z = Math.sqrt(p2 - x * x - y * y);
    const pair = trilaterate(m1, m2, m3, d1, d2, d3)!;
    const up = pair.find((p) => p[2] > 0)!;
    const down = pair.find((p) => p[2] < 0)!;
    for (let i = 0; i < 3; i++) expect(up[i]).toBeCloseTo([x, y, z][i], 10);
    expect(up[0]).toBeCloseTo(truth[0], 10);
    expect(up[1]).toBeCloseTo(truth[1], 10);
    expect(up[2]).toBeCloseTo(truth[2], 10);
    // the other answer is the mirror image in the springline plane
    expect(down[0]).toBeCloseTo(up[0], 10);
    expect(down[2]).toBeCloseTo(-up[2], 10);
  });

  it('general position: both answers are at the given distances', () => {
    const r = seeded(3);
    for (let k = 0; k < 20; k++) {
      const pts = [0, 1, 2].map(() => [uniform(r, 3), uniform(r, 3), uniform(r, 3)] as Vec3);
      const q: Vec3 = [uniform(r, 2), uniform(r, 2), uniform(r, 2)];
      const d = pts.map((p) => dist(p, q));
      const pair = trilaterate(pts[0], pts[1], pts[2], d[0], d[1], d[2])!;
      for (const s of pair) for (let i = 0; i < 3; i++) expect(dist(s, pts[i])).toBeCloseTo(d[i], 8);
      expect(Math.min(dist(pair[0], q), dist(pair[1], q))).toBeLessThan(1e-8);
    }
  });

  it('refuses collinear centres and spheres that do not meet', () => {
    expect(trilaterate([0, 0, 0], [1, 0, 0], [2, 0, 0], 1, 1, 1)).toBeNull();
    expect(trilaterate([0, 0, 0], [1, 0, 0], [0, 1, 0], 0.1, 0.1, 0.1)).toBeNull();
  });

  it('least squares refines the closed form: with noisy tapes to four marks and the zenith it lands within centimetres', () => {
    const r = seeded(11);
    const anchors: Vec3[] = [rimPoint(0), rimPoint(90), rimPoint(180), rimPoint(270), [0, 0, R]];
    const d = anchors.map((a) => dist(a, truth) + 0.005 * gauss(r));
    const closed = trilaterate(anchors[0], anchors[1], anchors[3], d[0], d[1], d[3], 0.05)!;
    const closedErr = Math.min(...closed.map((p) => dist(p, truth)));
    const found = locatePoint(anchors, d, [0, -1.9, 0.3])!;
    expect(dist(found.point, truth)).toBeLessThan(0.02);
    expect(dist(found.point, truth)).toBeLessThan(closedErr + 1e-9);
    expect(found.rms).toBeLessThan(0.01);
    // exact distances: least squares from a rough start reaches the point itself
    const exact = trilaterateLeastSquares(anchors, anchors.map((a) => dist(a, truth)), [0, -1.5, 0.6]);
    expect(dist(exact.point, truth)).toBeLessThan(1e-7);
  });

  it('with all marks in the springline plane it keeps the answer on the preferred side', () => {
    const anchors = [rimPoint(0), rimPoint(90), rimPoint(180), rimPoint(270)];
    const d = anchors.map((a) => dist(a, truth));
    expect(locatePoint(anchors, d, [0, -2, 0.5])!.point[2]).toBeGreaterThan(0);
    expect(locatePoint(anchors, d, [0, -2, -0.5])!.point[2]).toBeLessThan(0);
  });
});

describe('measurement documents', () => {
  const ok = {
    units: 'cm',
    measurements: [{ between: ['mirror.pole', 'rim@90'], distance: 306.9 }, { between: ['projector.lens', 'floor'], distance: '23 in', sigma: 0.5 }],
    observations: [
      { pixel: [960, 300], azimuth: 177.5, altitude: 47 },
      { pixel: [978, 494], at: 'zenith', sigma: 0.5 },
      { pixel: [981, 876], at: 'rim@-0' },
    ],
    free: ['mirror.center', 'projector.roll'],
  };

  it('reads lengths in the file units or with their own, defaults and targets', () => {
    const set = measurementsFromDocument(ok);
    expect(set.units).toBe('cm');
    expect(set.measurements[0].distance).toBeCloseTo(3.069, 12);
    expect(set.measurements[0].sigma).toBe(0.005);
    expect(set.measurements[0].label).toBe('mirror.pole - rim@90');
    expect(set.measurements[1].distance).toBeCloseTo(23 * 0.0254, 12);
    expect(set.measurements[1].sigma).toBeCloseTo(0.005, 12);
    expect(set.observations[0].target).toEqual({ kind: 'direction', azimuth: 177.5 * DEG, altitude: 47 * DEG });
    expect(set.observations[0].sigma).toBeCloseTo(0.2 * DEG, 15);
    expect(set.observations[1].target).toEqual({ kind: 'zenith' });
    expect(set.observations[1].sigma).toBeCloseTo(0.5 * DEG, 15);
    expect(set.observations[2].target).toEqual({ kind: 'rim', azimuth: 0 });
    expect(set.free).toEqual(['mirror.center', 'projector.roll']);
    expect(measurementsFromDocument({ units: 'ft', measurements: ok.measurements }).measurements[0].sigma).toBeCloseTo(0.00635, 12);
  });

  const bad = (patch: (d: typeof ok) => unknown, message: string) => {
    const d = structuredClone(ok);
    const doc = patch(d) ?? d;
    expect(() => measurementsFromDocument(doc)).toThrow(RigError);
    expect(() => measurementsFromDocument(doc)).toThrow(message);
  };

  it('names the field, what was expected and what came', () => {
    bad((d) => void ((d.measurements[1] as Record<string, unknown>).distance = -3), 'measurements[1].distance: expected a positive length, got -3');
    bad((d) => void (d.measurements[0].between = ['mirror.pole', 'zenit']), 'measurements[0].between[1]: expected a point name (mirror.pole, projector.lens, zenith, rim@AZ, floor), got "zenit"; did you mean "zenith"?');
    bad((d) => void (d.measurements[0].between = ['floor', 'floor']), 'measurements[0].between: expected at most one "floor", got ["floor","floor"]');
    bad((d) => void (d.measurements[0].between = ['rim@90', 'rim@90']), 'measurements[0].between: expected two different points, got ["rim@90","rim@90"]');
    bad((d) => void (d.measurements[0].between = ['mirror.pole']), 'measurements[0].between: expected two point names [A, B], got ["mirror.pole"]');
    bad((d) => void delete (d.measurements[0] as Record<string, unknown>).distance, 'measurements[0].distance: is missing');
    bad((d) => void ((d.measurements[0] as Record<string, unknown>).distnce = 3), 'measurements[0].distnce: unknown field; did you mean "distance"?');
    bad((d) => void ((d.observations[0] as Record<string, unknown>).altitude = 95), 'observations[0].altitude: expected an altitude from -90 to 90 degrees, got 95');
    bad((d) => void ((d.observations[1] as Record<string, unknown>).at = 'horizon'), 'observations[1].at: expected zenith or rim@AZ, got "horizon"');
    bad((d) => void ((d.observations[0] as Record<string, unknown>).pixel = [1, 2, 3]), 'observations[0].pixel: expected two numbers [x, y], got [1,2,3]');
    bad((d) => void ((d.observations[0] as Record<string, unknown>).at = 'zenith'), 'observations[0]: give either at or azimuth and altitude, not both');
    bad((d) => void (d.free = ['mirror.centre']), 'free[0]: expected one of mirror.center, mirror.radius, projector.position, projector.lookAt, projector.roll, projector.throwRatio, projector.lensShift, dome.radius, got "mirror.centre"; did you mean "mirror.center"?');
    bad((d) => void (d.free = ['projector.roll', 'projector.roll']), 'free[1]: expected each quantity once, got "projector.roll" twice');
    bad((d) => ({ ...d, units: 'yards' }), 'units: unknown unit "yards"');
    bad(() => ({ units: 'm' }), 'measurements: expected at least one measurement or observation, got none');
  });
});

describe('the observation model', () => {
  it('logMap has the length of the angle and vanishes at the observed direction', () => {
    const r = seeded(5);
    for (let k = 0; k < 50; k++) {
      const o = normalize([gauss(r), gauss(r), gauss(r)]);
      const w = normalize([gauss(r), gauss(r), gauss(r)]);
      expect(Math.hypot(...logMap(o, w))).toBeCloseTo(angleBetween(o, w), 12);
      expect(Math.hypot(...logMap(o, o))).toBeLessThan(1e-15);
    }
    // at the zenith, where azimuth means nothing, it still works
    const z: Vec3 = [0, 0, 1];
    expect(Math.hypot(...logMap(z, normalize([0.01, 0, 1])))).toBeCloseTo(Math.atan(0.01), 12);
  });

  it('extendedPixelDirection agrees with the trace on the mirror and is continuous across its silhouette', () => {
    const rig = nominal();
    const t = new Tracer(rig);
    const f = projectorFrame(rig.projector);
    const w: Vec3 = [0, 0, 0];
    expect(extendedPixelDirection(rig, f, 960, 500, w)).toBe(true);
    const h = t.pixel(960, 500);
    if (h.kind === 'mirror-miss') throw new Error('expected a hit');
    expect(angleBetween(w, h.direction)).toBeLessThan(1e-12);
    // walk up column 960 to the mirror's silhouette (the singular place, STYLE.md 7)
    let lo = 0;
    let hi = 500;
    while (hi - lo > 1e-9) {
      const mid = (lo + hi) / 2;
      if (t.pixel(960, mid).kind === 'mirror-miss') lo = mid;
      else hi = mid;
    }
    const a: Vec3 = [0, 0, 0];
    const b: Vec3 = [0, 0, 0];
    expect(extendedPixelDirection(rig, f, 960, lo, a)).toBe(false);
    extendedPixelDirection(rig, f, 960, hi, b);
    expect(angleBetween(a, b)).toBeLessThan(1e-3);
  });
});

describe('fitRig on synthetic ground truth', () => {
  it('recovers perturbed demo rigs: the fitted warp lands within a fraction of a degree, and standard errors are honest', () => {
    let within = 0;
    let total = 0;
    const ratios: number[] = [];
    for (let seed = 1; seed <= 12; seed++) {
      const r = seeded(1000 + seed);
      const truth = perturbed(r);
      const set: MeasurementSet = { units: 'm', measurements: tapes(truth, r), observations: observe(truth, r, 10), free: FREE };
      const res = fitRig(nominal(), set);
      expect(res.converged).toBe(true);
      expect(res.degeneracies.filter((d) => d.severity === 'undetermined')).toEqual([]);
      const before = landingErrors(truth, nominal());
      const after = landingErrors(truth, res.rig);
      const p95After = percentile(after, 0.95);
      ratios.push(percentile(before, 0.95) / p95After);
      expect(p95After, `seed ${seed}`).toBeLessThan(0.6);
      expect(percentile(after, 0.5), `seed ${seed}`).toBeLessThan(0.25);
      // honesty: |fitted − true| within 3 standard errors, counted over every scalar component
      for (const p of res.parameters) {
        const tv: number[] | null =
          p.name === 'mirror.center' ? truth.mirror.center : p.name === 'projector.position' ? truth.projector.position : p.name === 'projector.roll' ? [truth.projector.roll] : p.name === 'projector.throwRatio' ? [truth.projector.throwRatio] : null;
        if (tv) {
          p.value.forEach((v, i) => {
            total++;
            if (Math.abs(v - tv[i]) <= 3 * p.stderr[i]!) within++;
          });
        } else if (p.name === 'projector.lookAt') {
          // the aim: compare directions, against the larger of its two angular standard errors
          const fa = normalize([0, 1, 2].map((i) => truth.projector.lookAt[i] - truth.projector.position[i]) as Vec3);
          const fb = normalize([0, 1, 2].map((i) => res.rig.projector.lookAt[i] - res.rig.projector.position[i]) as Vec3);
          total++;
          if (angleBetween(fa, fb) <= 3 * Math.SQRT2 * Math.max(...p.aimStderr!.map((s) => s!))) within++;
        }
      }
    }
    // the fit improves the landing error many times over on every rig
    expect(Math.min(...ratios)).toBeGreaterThan(5);
    // "most seeded runs": a normal error is within 3σ 99.7% of the time; allow for few degrees of freedom
    expect(within / total).toBeGreaterThan(0.9);
  });

  it('one bad tape reading: --robust down-weights it and names it; plain least squares is dragged', () => {
    const r = seeded(77);
    const truth = perturbed(r);
    const measurements = tapes(truth, r);
    measurements[1] = { ...measurements[1], distance: measurements[1].distance + 0.12 }; // misread by 12 cm
    const set: MeasurementSet = { units: 'm', measurements, observations: observe(truth, r, 10), free: FREE };
    const plain = fitRig(nominal(), set);
    const robust = fitRig(nominal(), set, { robust: true });
    const centreError = (rig: Rig) => Math.hypot(...rig.mirror.center.map((x, i) => x - truth.mirror.center[i]));
    expect(centreError(robust.rig)).toBeLessThan(0.5 * centreError(plain.rig));
    expect(plain.worst?.field).toBe('measurements[1]');
    // the core names the option, not a flag: the CLI words it as --robust
    expect(plain.warnings.some((w) => w.rule === 'fit.outlier' && w.parameter === 'measurements[1]' && w.text.startsWith('measurements[1] (1) is') && w.text.includes('try {option:robust}'))).toBe(true);
    expect([...plain.warnings, ...robust.warnings].every((w) => !w.text.includes('--'))).toBe(true);
    const bad = robust.residuals.find((x) => x.field === 'measurements[1]')!;
    expect(bad.weight).toBeLessThan(0.2);
    expect(robust.warnings.some((w) => w.rule === 'fit.down-weighted' && w.text.startsWith('measurements[1] (1) disagrees with the rest'))).toBe(true);
    expect(robust.residuals.filter((x) => x.weight < 0.5).map((x) => x.field)).toEqual(['measurements[1]']);
  });

  it('starts from trilateration when the rough rig is far off', () => {
    const r = seeded(21);
    const truth = perturbed(r);
    const start = nominal();
    start.mirror.center = [0.25, -1.7, 0.3]; // a quarter metre out
    const set: MeasurementSet = { units: 'm', measurements: tapes(truth, r), observations: observe(truth, r, 10), free: FREE };
    const res = fitRig(start, set);
    expect(res.notes.some((n) => n.text.startsWith('mirror.pole placed by trilateration from 3 distances (rim@0, rim@90, rim@270'))).toBe(false);
    expect(res.notes.some((n) => n.text.startsWith('mirror.pole placed by trilateration from 4 distances (rim@0, rim@90, rim@270, zenith)'))).toBe(true);
    expect(percentile(landingErrors(truth, res.rig), 0.95)).toBeLessThan(0.6);
  });

  it('reports the mirror-missing pixels of the starting rig and still converges', () => {
    const r = seeded(31);
    const truth = perturbed(r);
    const start = nominal();
    start.projector.lookAt = [0.12, -1.95, 0.25]; // aimed so far off that some observed pixels miss the mirror
    const observations = observe(truth, r, 12);
    const set: MeasurementSet = { units: 'm', measurements: tapes(truth, r), observations, free: FREE };
    const res = fitRig(start, set);
    expect(res.warnings.some((w) => w.rule === 'fit.start-misses-mirror' && /misses the mirror in the starting rig/.test(w.text))).toBe(true);
    expect(res.residuals.every((x) => x.kind === 'distance' || x.onMirror)).toBe(true);
    expect(res.after.rms).toBeLessThan(2);
  });

  it('zenith and rim observations, dome.radius and mirror.radius free', () => {
    const r = seeded(41);
    const truth = perturbed(r);
    const t = new Tracer(truth);
    const zen = locateDirection(t, 0, Math.PI / 2);
    const front = locateDirection(t, 0, 0);
    if (!zen.pixel || !front.pixel) throw new Error('expected the truth to light the zenith and the front rim');
    const observations = observe(truth, r, 10);
    observations.push({ pixel: zen.pixel, target: { kind: 'zenith' }, sigma: 0.2 * DEG, label: 'zenith', field: 'observations[10]' });
    observations.push({ pixel: front.pixel, target: { kind: 'rim', azimuth: 0 }, sigma: 0.2 * DEG, label: 'rim@0', field: 'observations[11]' });
    const set: MeasurementSet = { units: 'm', measurements: tapes(truth, r), observations, free: [...FREE, 'mirror.radius', 'dome.radius'] };
    const res = fitRig(nominal(), set);
    expect(percentile(landingErrors(truth, res.rig), 0.95)).toBeLessThan(0.6);
    const zr = res.residuals.find((x) => x.field === 'observations[10]')!;
    expect(zr.kind === 'observation' && zr.angle * RAD).toBeLessThan(0.6);
  });
});

describe('fitRig on degenerate sets', () => {
  const truth = (): Rig => perturbed(seeded(99));

  it('observations all on one line through the image centre: the aim and the lens shift cannot be told apart', () => {
    const t = truth();
    const r = seeded(5);
    // the row through the principal point: tilting the projector and shifting its lens move these
    // pixels identically to first order
    let x = 300;
    const observations = observe(t, r, 8, 0.2, () => [(x += 130), 600]);
    const res = fitRig(nominal(), { units: 'm', measurements: [], observations, free: ['projector.lookAt', 'projector.lensShift'] });
    const d = res.degeneracies.find((g) => g.severity === 'undetermined');
    expect(d, JSON.stringify(res.degeneracies)).toBeDefined();
    expect(d!.quantities).toEqual(expect.arrayContaining(['projector.lookAt', 'projector.lensShift']));
    expect(d!.components).toEqual(expect.arrayContaining(['projector.lookAt (aim elevation)', 'projector.lensShift[1]']));
    expect(res.warnings.map((w) => w.text)).toContain(d!.message);
    expect(d!.message).toMatch(/^projector\.(lookAt|lensShift) and projector\.(lookAt|lensShift) cannot be told apart with these measurements and points/);
    const shift = res.parameters.find((p) => p.name === 'projector.lensShift')!;
    expect(shift.stderr[1]).toBeNull();
  });

  it('a quantity nothing depends on is named as undetermined', () => {
    // distances between the mirror pole and the rim only: the projector's roll plays no part
    const t = truth();
    const r = seeded(6);
    const measurements = tapes(t, r).filter((m) => m.between.every((p) => p.kind !== 'projector.lens'));
    const res = fitRig(nominal(), { units: 'm', measurements, observations: [], free: ['mirror.center', 'projector.roll'] });
    const d = res.degeneracies.find((g) => g.quantities.includes('projector.roll'))!;
    expect(d.severity).toBe('undetermined');
    expect(d.message).toMatch(/^projector\.roll cannot be determined from these measurements and points/);
    expect(res.parameters.find((p) => p.name === 'projector.roll')!.stderr).toEqual([null]);
    expect(res.parameters.find((p) => p.name === 'mirror.center')!.stderr.every((s) => s !== null && s < 0.02)).toBe(true);
  });

  it('fewer equations than unknowns: refused with the counts', () => {
    const t = truth();
    const observations = observe(t, seeded(8), 2);
    const set: MeasurementSet = { units: 'm', measurements: [], observations, free: ['mirror.center', 'projector.lookAt', 'projector.roll'] };
    expect(() => fitRig(nominal(), set)).toThrow(RigError);
    expect(() => fitRig(nominal(), set)).toThrow(
      'free: fewer equations than unknowns: expected at least 6 equations for mirror.center (3), projector.lookAt (2), projector.roll (1), got 4 (0 distances, 2 observations × 2)',
    );
  });

  it('refuses inputs the rig cannot answer', () => {
    const noFloor = nominal();
    noFloor.dome.floor = undefined;
    const floorTape: MeasurementSet = { units: 'm', measurements: [{ between: [P('mirror.pole'), P('floor')], distance: 0.9, sigma: 0.005, label: '', field: 'measurements[0]' }], observations: [], free: ['dome.radius'] };
    expect(() => fitRig(noFloor, floorTape)).toThrow('measurements[0].between[1]: expected dome.floor in the rig to measure to "floor", got a rig without it');
    const outside: MeasurementSet = { units: 'm', measurements: [], observations: [{ pixel: [2000, 10], target: { kind: 'zenith' }, sigma: 0.01, label: '', field: 'observations[0]' }], free: ['projector.roll'] };
    expect(() => fitRig(nominal(), outside)).toThrow('observations[0].pixel: expected a pixel inside the 1920 × 1200 frame, got [2000, 10]');
    expect(() => fitRig(nominal(), { ...floorTape, free: [] })).toThrow('free: expected at least one rig quantity to solve');
  });
});
