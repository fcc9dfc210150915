/**
 * The mirror as a tape measures it: `mirror.pole` (the apex of the cap) in place of `mirror.center`,
 * and a cap given by rim width and depth that is deeper than a hemisphere (DESIGN.md "Mirror model").
 */
import { describe, expect, it } from 'vitest';
import { RigError } from '../src/rig/model.js';
import { rigFromDocument, sagittaRadius } from '../src/rig/document.js';
import { DEG, RAD } from '../src/math.js';
import { Tracer } from '../src/trace.js';

type Doc = Record<string, any>;

/** The rig of fixtures/vectors/vectors-a.json, the mirror facing the front and tipped up. */
function baseDoc(): Doc {
  return {
    units: 'm',
    dome: { radius: 2 },
    mirror: { radius: 0.2, center: [0, -1.6, 0.25], axis: [0, 1, 0.5], capAngle: 90 },
    projector: { position: [0, -0.7, 0.15], lookAt: [0, -1.6, 0.3], roll: 0, resolution: [1600, 900], throwRatio: 1.4, lensShift: [0, 0] },
    content: { fov: 180 },
  };
}

function rigError(doc: unknown): RigError {
  try {
    rigFromDocument(doc);
  } catch (e) {
    expect(e).toBeInstanceOf(RigError);
    return e as RigError;
  }
  throw new Error('expected a RigError, but the rig was accepted');
}

describe('mirror.pole: the apex of the cap, on its axis', () => {
  it('puts the centre one radius behind the pole along the axis', () => {
    const a = Math.hypot(1, 0.5);
    const pole = [0, -1.6 + 0.2 / a, 0.25 + 0.1 / a];
    const doc = baseDoc();
    delete doc.mirror.center;
    doc.mirror.pole = pole;
    const rig = rigFromDocument(doc);
    expect(rig.mirror.center[0]).toBeCloseTo(0, 14);
    expect(rig.mirror.center[1]).toBeCloseTo(-1.6, 14);
    expect(rig.mirror.center[2]).toBeCloseTo(0.25, 14);
  });

  it('traces as the same mirror given by its centre', () => {
    const byCenter = new Tracer(rigFromDocument(baseDoc()));
    const doc = baseDoc();
    const a = Math.hypot(1, 0.5);
    delete doc.mirror.center;
    doc.mirror.pole = [0, -1.6 + 0.2 / a, 0.25 + 0.1 / a];
    const byPole = new Tracer(rigFromDocument(doc));
    let lit = 0;
    for (const [x, y] of [[800, 450], [700, 300], [900, 620], [810.5, 200.25]]) {
      const h1 = byCenter.pixel(x, y);
      const h2 = byPole.pixel(x, y);
      expect(h2.kind).toBe(h1.kind);
      if (h1.kind === 'dome' && h2.kind === 'dome') {
        lit++;
        expect(h2.fisheye[0]).toBeCloseTo(h1.fisheye[0], 12);
        expect(h2.fisheye[1]).toBeCloseTo(h1.fisheye[1], 12);
      }
    }
    expect(lit).toBeGreaterThan(0);
  });

  it('in feet and inches, with a cap: the radius comes from the cap, the centre from the pole', () => {
    const rig = rigFromDocument({
      ...baseDoc(),
      units: 'ft',
      dome: { diameter: '16 ft' },
      mirror: { cap: { width: '24 in', depth: '6 in' }, pole: ['0 in', '-5 ft', '1 ft 6 in'], axis: [0, 0, 1] },
      projector: { position: ['0 in', '-2 ft', '1 ft'], lookAt: ['0 in', '-5 ft', '1 ft 4 in'], resolution: [1280, 800], throwRatio: 1.6 },
    });
    // r = (6² + 12²) / (2·6) = 15 in
    expect(rig.mirror.radius).toBeCloseTo(15 * 0.0254, 14);
    expect(rig.mirror.center[2]).toBeCloseTo((18 - 15) * 0.0254, 14);
  });

  it('takes exactly one of mirror.center and mirror.pole', () => {
    const both = baseDoc();
    both.mirror.pole = [0, -1.4, 0.35];
    expect(rigError(both).message).toBe('mirror: give mirror.center or mirror.pole, not both');
    const neither = baseDoc();
    delete neither.mirror.center;
    expect(rigError(neither).message).toBe('mirror.center: is missing (give mirror.center, or mirror.pole: the apex of the cap)');
    const bad = baseDoc();
    delete bad.mirror.center;
    bad.mirror.pole = [0, '-1.4 furlongs', 0.35];
    expect(rigError(bad).message).toBe('mirror.pole[1]: unknown unit "furlongs" in "-1.4 furlongs" (expected one of m, cm, mm, ft, in)');
  });
});

describe('a cap deeper than a hemisphere', () => {
  // The sagitta relation r = (w²/4 + d²) / (2d) (handbook geometry: the intersecting-chords theorem,
  // Euclid III.35) holds for either root; a cap deeper than its half-width is past the hemisphere.
  it('50 cm wide and 26 cm deep gives r ≈ 25.02 cm and a cap of ≈ 92.2°', () => {
    const doc = baseDoc();
    doc.mirror = { cap: { width: '50 cm', depth: '26 cm' }, center: [0, -1.6, 0.25], axis: [0, 1, 0.5] };
    doc.projector.position = [0, -0.7, 0.15];
    const rig = rigFromDocument(doc);
    expect(rig.mirror.radius).toBeCloseTo((0.25 * 0.25 + 0.26 * 0.26) / (2 * 0.26), 15);
    expect(rig.mirror.radius * 100).toBeCloseTo(25.02, 2);
    expect(rig.mirror.capAngle * RAD).toBeCloseTo(92.2, 1);
    expect(rig.mirror.capAngle).toBeGreaterThan(90 * DEG);
    // the rim the file gives: half the width from the axis, the depth below the pole
    const r = rig.mirror.radius;
    expect(r * Math.sin(rig.mirror.capAngle)).toBeCloseTo(0.25, 14);
    expect(r - r * Math.cos(rig.mirror.capAngle)).toBeCloseTo(0.26, 14);
  });

  it('the same cap by its centre and by its pole', () => {
    const doc = baseDoc();
    doc.mirror = { cap: { width: 0.5, depth: 0.26 }, pole: [0, -1.2, 0.25], axis: [0, 1, 0] };
    const rig = rigFromDocument(doc);
    expect(rig.mirror.center[1]).toBeCloseTo(-1.2 - sagittaRadius(0.5, 0.26), 14);
  });

  it('a cap of exactly a hemisphere stays 90°, and nearly a full sphere approaches 180°', () => {
    const hemi = baseDoc();
    hemi.mirror = { cap: { width: 0.4, depth: 0.2 }, center: [0, -1.6, 0.25], axis: [0, 1, 0] };
    expect(rigFromDocument(hemi).mirror.capAngle).toBeCloseTo(Math.PI / 2, 14);
    const ball = baseDoc();
    ball.mirror = { cap: { width: 0.02, depth: 0.2 }, center: [0, -1.6, 0.25], axis: [0, 1, 0] };
    const rig = rigFromDocument(ball);
    expect(rig.mirror.capAngle * RAD).toBeGreaterThan(168);
    expect(rig.mirror.capAngle * RAD).toBeLessThan(180);
  });
});
