/**
 * The report's figures: coverage two independent ways, arcminutes per pixel against the paraxial
 * mirror equation, brightness, focus and the eye-height safety findings.
 */
import { describe, expect, it } from 'vitest';
import { analyzeRig } from '../src/analysis/analyze.js';
import { ARCMIN_PER_RADIAN, pixelResolution } from '../src/analysis/resolution.js';
import { cellMeasures, sampleFrame } from '../src/analysis/sample.js';
import { contentSolidAngle, coverageFromDirections } from '../src/analysis/coverage.js';
import { deg, validateRigGeometry, type Rig } from '../src/rig/model.js';
import { reflectedThrough, STANDING_CAUTIONS } from '../src/analysis/safety.js';
import { Tracer } from '../src/trace.js';
import { type Vec3 } from '../src/math.js';

/** The demo scenario (5 m dome, 60 cm hemisphere near the back wall, WUXGA projector). */
function demoRig(over: (r: Rig) => void = () => {}): Rig {
  const s = Math.SQRT1_2;
  const rig: Rig = {
    units: 'm',
    name: 'demo',
    dome: { radius: 2.5, floor: 0.5 },
    mirror: { center: [0, -1.95, 0.15], radius: 0.3, axis: [0, s, s], capAngle: deg(90) },
    projector: { position: [0, -0.75, 0.1], lookAt: [0, -1.95, 0.25], roll: 0, resolution: [1920, 1200], throwRatio: 1.6, lensShift: [0, 0] },
    content: { fov: deg(180), eye: [0, 0, 0] },
  };
  over(rig);
  validateRigGeometry(rig);
  return rig;
}

describe('coverage, two independent ways', () => {
  // One way integrates the lit solid angle over the projector grid (cells as spherical triangles,
  // edges subdivided); the other samples dome directions and asks the inverse (locateDirection)
  // whether a pixel lights each. They share no code past the rig, so agreement checks both.
  const cases: [string, Rig][] = [
    ['the demo rig', demoRig()],
    ['a 160° content fov, an eye off centre and a body in the light', demoRig((r) => {
      r.content = { fov: deg(160), eye: [0, 0.3, 0.2] };
      r.projector.body = { width: 0.3, length: 0.3, height: 0.15 };
    })],
    ['a shallow cap aimed up', demoRig((r) => {
      r.mirror = { center: [0, -1.6, -0.1], radius: 0.45, axis: [0, 0.5, 1].map((x) => x / Math.hypot(0, 0.5, 1)) as Vec3, capAngle: deg(40) };
      r.projector.lookAt = [0, -1.6, 0.2];
    })],
  ];
  for (const [name, rig] of cases) {
    it(`agrees within half a percent: ${name}`, () => {
      const tracer = new Tracer(rig);
      const cells = cellMeasures(sampleFrame(tracer, { vertices: 40_000 }), 3);
      const byGrid = cells.total / contentSolidAngle(tracer);
      const byInverse = coverageFromDirections(tracer, { azimuths: 240, zenithSteps: 150 }).fraction;
      expect(byGrid).toBeGreaterThan(0.05);
      expect(Math.abs(byGrid - byInverse)).toBeLessThan(0.005);
    });
  }

  it('knows the content solid angle of a hemisphere: 2π sr (geometry)', () => {
    expect(contentSolidAngle(new Tracer(demoRig()))).toBeCloseTo(2 * Math.PI, 12);
  });
});

describe('resolution near the mirror axis', () => {
  it('matches the paraxial mirror equation with f = −r/2 for a convex mirror', () => {
    // Optics handbook: mirror equation 1/s + 1/s′ = 2/R; a convex mirror has f = −R/2, so a point
    // source (the lens) at distance s has a virtual image |s′| = sR/(2s + R) behind the mirror, and
    // a ray leaving the lens at a small angle δ leaves the mirror as if from that image at δ·(1 + 2s/R).
    // With the content's eye placed at the virtual image, one pixel (δ = 1/(W·T) on the axis) spans
    // δ·(1 + 2s/R) seen from the eye.
    const r = 0.3;
    const C: Vec3 = [0, 0, 0.5];
    const P: Vec3 = [0, 1.5, 0.5];
    const s = P[1] - (C[1] + r); // lens to the mirror's pole
    const image = (s * r) / (2 * s + r);
    const rig: Rig = {
      units: 'm',
      dome: { radius: 5 },
      mirror: { center: C, radius: r, axis: [0, 1, 0], capAngle: deg(90) },
      projector: { position: P, lookAt: C, roll: 0, resolution: [1920, 1200], throwRatio: 2, lensShift: [0, 0] },
      content: { fov: deg(180), eye: [0, C[1] + r - image, 0.5] },
    };
    validateRigGeometry(rig);
    const expected = (1 / (1920 * 2)) * (1 + (2 * s) / r) * ARCMIN_PER_RADIAN;
    const got = pixelResolution(new Tracer(rig), 960, 600)!;
    expect(got).not.toBeNull();
    expect(Math.abs(got.arcmin / expected - 1)).toBeLessThan(0.002);
    // on the axis the pixel is stretched equally both ways
    expect(Math.abs(got.major / got.minor - 1)).toBeLessThan(0.002);
  });
});

describe('analyzeRig on the demo rig', () => {
  const a = analyzeRig(demoRig(), { vertices: 30_000, directions: { azimuths: 180, zenithSteps: 90 } });
  const f = a.figures;

  it('gives every figure under stable keys', () => {
    expect(Object.keys(f)).toEqual(['rig', 'coverage', 'pixels', 'resolution', 'brightness', 'spill', 'focus', 'safety', 'facets']);
    expect(f.coverage.byAzimuth.length).toBe(36);
    expect(f.resolution.unit).toBe('arcmin per projector pixel');
  });

  it('shares out the pixels, and orders its percentiles', () => {
    const p = f.pixels;
    expect(p.lit! + p.shadow! + p.outsideContent! + p.belowHorizon! + p.mirrorMiss!).toBeCloseTo(1, 3);
    expect(f.resolution.p5!).toBeLessThan(f.resolution.median!);
    expect(f.resolution.median!).toBeLessThan(f.resolution.p95!);
    // no rig beats spreading every pixel evenly over the dome
    expect(f.resolution.median!).toBeGreaterThan(f.resolution.ideal);
  });

  it('evens out the brightness with compensation, at a cost in light', () => {
    expect(f.brightness.ratioBefore!).toBeGreaterThan(2);
    expect(f.brightness.ratioAfter!).toBeLessThan(f.brightness.ratioBefore!);
    expect(f.brightness.lightLost!).toBeGreaterThan(0);
    expect(f.brightness.lightLost!).toBeLessThan(1);
  });

  it('finds the lens-to-mirror beam at the eye height of people sitting on the floor', () => {
    // lens 0.6 m above the floor, mirror centre 0.65 m: inside the 0.6–0.9 m band (common practice)
    const band = f.safety.bands.find((b) => b.name === 'floor-seated')!;
    expect(band.directBeam.crosses).toBe(true);
    expect(f.safety.findings.some((x) => x.level === 'danger')).toBe(true);
    expect(f.safety.cautions).toEqual(STANDING_CAUTIONS);
    expect(f.safety.cautions.join(' ')).toMatch(/never look into the beam/i);
    expect(f.safety.cautions.join(' ')).toMatch(/fire and building codes/);
  });

  it('says the focus depth, and warns when the mirror is nearer than the lens can focus', () => {
    expect(f.focus.depth.range!).toBeGreaterThan(0);
    expect(f.focus.blur).toBeNull();
    const near = analyzeRig(demoRig((r) => ((r.projector.minFocus = 1.5), (r.projector.aperture = 0.03))), { vertices: 5000, directions: { azimuths: 36, zenithSteps: 20 } }).figures.focus;
    expect(near.warnings.some((w) => /minFocus/.test(w))).toBe(true);
    expect(near.blur!.pixelsMax!).toBeGreaterThan(0);
  });

  it('sees reflected light through a point in front of the mirror, and none behind it', () => {
    expect(reflectedThrough(a.sample, [0, 0, 1.2])).toBe(true);
    expect(reflectedThrough(a.sample, [0, -2.35, 0.1])).toBe(false);
  });

  it('without dome.floor, keeps the standing cautions and says why the eye heights are missing', () => {
    const g = analyzeRig(demoRig((r) => delete r.dome.floor), { vertices: 3000, directions: { azimuths: 36, zenithSteps: 20 } }).figures.safety;
    expect(g.floorKnown).toBe(false);
    expect(g.findings[0].text).toMatch(/dome\.floor/);
    expect(g.cautions.length).toBe(STANDING_CAUTIONS.length);
  });
});
