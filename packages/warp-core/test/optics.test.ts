/**
 * The mirror's optics (DESIGN.md "Mirror model") against three.js, and physical laws on traced pixels.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
// @ts-expect-error three ships no type declarations in this workspace
import { Ray, Sphere, Vector3 } from 'three';
import { cross, dot, length, normalize, sub, type Vec3 } from '../src/math.js';
import { insideFrame, rayToPixel } from '../src/optics/projector.js';
import { onCap, raySphereFirstHit, reflect } from '../src/optics/mirror.js';
import type { MirrorModel, Rig } from '../src/rig/model.js';
import { rigFromDocument } from '../src/rig/document.js';
import { Tracer } from '../src/trace.js';
import { num, randomRig, rigParams, unitVec, vec } from './random-rigs.js';


const v3 = (a: readonly number[]) => new Vector3(a[0], a[1], a[2]);
const arr = (v: { x: number; y: number; z: number }): Vec3 => [v.x, v.y, v.z];
const at = (o: readonly number[], d: readonly number[], t: number): Vec3 => [o[0] + t * d[0], o[1] + t * d[1], o[2] + t * d[2]];

describe('raySphereFirstHit against three.js Ray.intersectSphere', () => {
  it('the same first hit (or the same miss) on random rays, to 1e-9', () => {
    fc.assert(
      fc.property(vec(-10, 10), unitVec, vec(-3, 3), num(0.05, 5), (o, d, c, r) => {
        // three.js r187 src/math/Ray.js intersectSphere: null for a miss or a sphere behind; from inside, the exit point.
        const three = new Ray(v3(o), v3(d)).intersectSphere(new Sphere(v3(c), r), new Vector3());
        // Away from the tangent, where rounding may decide hit or miss either way (tested separately below).
        const oc = sub(o, c);
        const perp2 = dot(oc, oc) - dot(oc, d) ** 2;
        fc.pre(Math.abs(r * r - perp2) > 1e-6 * r * r);
        const t = raySphereFirstHit(o, d, c, r);
        if (three === null) {
          expect(t).toBe(-1);
        } else {
          expect(t).toBeGreaterThanOrEqual(0);
          const p = at(o, d, t);
          const q = arr(three);
          for (let i = 0; i < 3; i++) expect(Math.abs(p[i] - q[i])).toBeLessThanOrEqual(1e-9);
        }
      }),
      { numRuns: 3000 },
    );
  });

  it('the tangent hit: a ray grazing the sphere touches it once (three.js agrees)', () => {
    // Origin (−5, 1, 0), direction +x, unit sphere at the origin: tangent at (0, 1, 0), t = 5 exactly.
    const o: Vec3 = [-5, 1, 0];
    const d: Vec3 = [1, 0, 0];
    expect(raySphereFirstHit(o, d, [0, 0, 0], 1)).toBe(5);
    expect(arr(new Ray(v3(o), v3(d)).intersectSphere(new Sphere(new Vector3(), 1), new Vector3()))).toEqual([0, 1, 0]);
  });

  it('the near miss and the near hit either side of the tangent', () => {
    const d: Vec3 = [1, 0, 0];
    const sphere = new Sphere(new Vector3(), 1);
    const miss: Vec3 = [-5, 1 + 1e-9, 0];
    expect(raySphereFirstHit(miss, d, [0, 0, 0], 1)).toBe(-1);
    expect(new Ray(v3(miss), v3(d)).intersectSphere(sphere, new Vector3())).toBeNull();
    const hit: Vec3 = [-5, 1 - 1e-9, 0];
    const t = raySphereFirstHit(hit, d, [0, 0, 0], 1);
    const q = arr(new Ray(v3(hit), v3(d)).intersectSphere(sphere, new Vector3()));
    // t = 5 − √(2·1e-9 − 1e-18): the first of two hits 9e-5 apart
    expect(t).toBeCloseTo(5 - Math.sqrt(2e-9 - 1e-18), 7);
    expect(Math.abs(at(hit, d, t)[0] - q[0])).toBeLessThan(1e-7);
  });

  it('a sphere behind the ray is a miss; a ray starting inside returns the exit (as three.js)', () => {
    expect(raySphereFirstHit([5, 0, 0], [1, 0, 0], [0, 0, 0], 1)).toBe(-1);
    expect(new Ray(new Vector3(5, 0, 0), new Vector3(1, 0, 0)).intersectSphere(new Sphere(new Vector3(), 1), new Vector3())).toBeNull();
    expect(raySphereFirstHit([0.5, 0, 0], [1, 0, 0], [0, 0, 0], 1)).toBe(0.5);
  });
});

describe('reflect against three.js Vector3.reflect', () => {
  // three.js r187 src/math/Vector3.js reflect(normal): this − 2(this·n)n, "reflects this vector off a plane
  // orthogonal to the given normal", n unit. The vector is the direction of travel (into the surface) and the
  // result the outgoing direction; the normal's sign does not matter. That is DESIGN.md's d′ = d − 2(d·n)n — not
  // the "reflect about the normal" convention 2(d·n)n − d, which is its negative.
  it('equals three.js on random directions and unit normals, for n and −n, to 1e-12', () => {
    fc.assert(
      fc.property(vec(-5, 5), unitVec, (d, n) => {
        const ours = reflect([0, 0, 0], d, n);
        const three = arr(v3(d).reflect(v3(n)));
        const threeNeg = arr(v3(d).reflect(v3(n).negate()));
        const k = 2 * dot(d, n);
        const aboutNormal: Vec3 = [k * n[0] - d[0], k * n[1] - d[1], k * n[2] - d[2]];
        for (let i = 0; i < 3; i++) {
          expect(Math.abs(ours[i] - three[i])).toBeLessThanOrEqual(1e-12);
          expect(Math.abs(ours[i] - threeNeg[i])).toBeLessThanOrEqual(1e-12);
        }
        // and not the other convention: the two differ by a sign, so they are 2|d| apart (a reflection keeps |d|)
        expect(length(sub(ours, aboutNormal))).toBeCloseTo(2 * length(d), 10);
      }),
      { numRuns: 1000 },
    );
  });

  it('out may alias d (gl-matrix tests/f64/Vec3.spec.ts style) — and n', () => {
    const d: Vec3 = [0.3, -0.8, 0.52];
    const n = normalize([0.1, 0.9, -0.2]);
    const expected = reflect([0, 0, 0], d, n);
    const aliasD: Vec3 = [d[0], d[1], d[2]];
    const r1 = reflect(aliasD, aliasD, n);
    expect(r1).toBe(aliasD);
    expect(r1).toEqual(expected);
    const aliasN: Vec3 = [n[0], n[1], n[2]];
    expect(reflect(aliasN, d, aliasN)).toEqual(expected);
  });
});

/** Like fixtures/vectors/vectors-a.json, with the projector on the mirror's axis and a wider lens. */
function onAxisRig(): Rig {
  return rigFromDocument({
    dome: { radius: 2 },
    mirror: { radius: 0.2, center: [0, -1.6, 0.25], axis: [0, 1, 0], capAngle: 60 },
    projector: { position: [0, -0.7, 0.25], lookAt: [0, -1.6, 0.25], resolution: [1600, 900], throwRatio: 0.8 },
  });
}

describe('singular places of the mirror (STYLE.md 7)', () => {
  it('a ray along the mirror axis hits the pole and reflects straight back', () => {
    const t = new Tracer(onAxisRig());
    const h = t.pixel(800, 450); // the optical axis (no lens shift): straight at the centre
    expect(h.kind).not.toBe('mirror-miss');
    if (h.kind === 'mirror-miss') return;
    expect(h.ray).toEqual([0, -1, 0]);
    expect(h.mirrorPoint[0]).toBe(0);
    expect(h.mirrorPoint[1]).toBeCloseTo(-1.4, 14); // the pole, center + r·axis
    expect(h.mirrorPoint[2]).toBeCloseTo(0.25, 14);
    expect(h.mirrorDistance).toBeCloseTo(0.7, 14);
    expect(h.reflected[0]).toBe(0);
    expect(h.reflected[1]).toBeCloseTo(1, 14); // |X − C|/r is 1 only to rounding
    expect(h.reflected[2]).toBeCloseTo(0, 14);
    // and on to the front of the dome at the lens height: (0, √(R² − z²), 0.25)
    expect(h.domePoint[1]).toBeCloseTo(Math.sqrt(4 - 0.25 ** 2), 12);
    expect(h.domePoint[2]).toBeCloseTo(0.25, 12);
  });

  it("the cap's edge: onCap just inside / just outside, and the trace lights / blocks the matching pixels", () => {
    const rig = onAxisRig();
    const m = rig.mirror;
    const t = new Tracer(rig);
    // points on the sphere at angle φ from the axis, in the plane x = 0, on the side the projector sees
    const point = (phi: number): Vec3 => [m.center[0], m.center[1] + m.radius * Math.cos(phi), m.center[2] + m.radius * Math.sin(phi)];
    for (const delta of [1e-3, 1e-6, 1e-9]) {
      const inside = point(m.capAngle - delta);
      const outside = point(m.capAngle + delta);
      expect(onCap(m, inside)).toBe(true);
      expect(onCap(m, outside)).toBe(false);
      if (delta < 1e-6) continue; // finer than the pixel → ray → hit round trip resolves
      const pin = rayToPixel(t.frame, sub(inside, t.frame.origin))!;
      const pout = rayToPixel(t.frame, sub(outside, t.frame.origin))!;
      expect(insideFrame(t.frame, pin[0], pin[1])).toBe(true);
      expect(t.pixel(pin[0], pin[1]).kind).not.toBe('mirror-miss');
      expect(t.pixel(pout[0], pout[1]).kind).toBe('mirror-miss');
    }
    // a cap of 180° is the whole sphere, its antipode included
    expect(onCap({ ...m, capAngle: Math.PI }, [m.center[0], m.center[1] - m.radius, m.center[2]])).toBe(true);
  });

  it('a cap facing away from the projector blocks every ray (the back of the mirror is a mirror miss)', () => {
    const rig = onAxisRig();
    const back: MirrorModel = { ...rig.mirror, axis: [0, -1, 0], capAngle: Math.PI / 3 };
    const t = new Tracer({ ...rig, mirror: back });
    const g = t.frameGrid();
    expect(g.kind.every((k) => k === 0)).toBe(true);
  });
});

// ——— random valid rigs ———

/** Lit pixels of a rig: the pixels of random points on the visible part of the cap that fall in the frame. */
function litPixels(t: Tracer, picks: [number, number][]): [number, number][] {
  const { mirror } = t.rig;
  const P = t.frame.origin;
  const pc = sub(P, mirror.center);
  const pl = length(pc);
  const e1 = normalize(pc);
  const e2 = normalize(cross(e1, Math.abs(e1[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0]));
  const e3 = cross(e1, e2);
  const alpha = Math.acos(mirror.radius / pl); // the silhouette, seen from the lens
  const out: [number, number][] = [];
  for (const [s, q] of picks) {
    const phi = alpha * Math.sqrt(s) * 0.999;
    const psi = 2 * Math.PI * q;
    const n = [0, 1, 2].map((i) => Math.cos(phi) * e1[i] + Math.sin(phi) * (Math.cos(psi) * e2[i] + Math.sin(psi) * e3[i])) as Vec3;
    const X: Vec3 = [mirror.center[0] + mirror.radius * n[0], mirror.center[1] + mirror.radius * n[1], mirror.center[2] + mirror.radius * n[2]];
    if (!onCap(mirror, X)) continue;
    const px = rayToPixel(t.frame, sub(X, P));
    if (px && insideFrame(t.frame, px[0], px[1])) out.push(px);
  }
  return out;
}

const picks = fc.array(fc.tuple(num(0, 1), num(0, 1)), { minLength: 8, maxLength: 8 });

describe('physical laws on traced pixels of random valid rigs', () => {
  it('law of reflection: equal angles to the normal, incident, normal and reflected rays coplanar', () => {
    // The law of reflection (standard geometric optics, e.g. Hecht, "Optics", the chapter on reflection — from memory).
    let checked = 0;
    fc.assert(
      fc.property(rigParams, picks, (p, pk) => {
        const rig = randomRig(p);
        fc.pre(rig !== null);
        const t = new Tracer(rig!);
        for (const [x, y] of litPixels(t, pk)) {
          const h = t.pixel(x, y);
          expect(h.kind).not.toBe('mirror-miss');
          if (h.kind === 'mirror-miss') continue;
          const n = normalize(sub(h.mirrorPoint, rig!.mirror.center));
          const cosIn = -dot(h.ray, n);
          const cosOut = dot(h.reflected, n);
          expect(cosIn).toBeGreaterThanOrEqual(-1e-12); // the light arrives on the outside of the sphere
          expect(Math.abs(cosIn - cosOut)).toBeLessThanOrEqual(1e-12);
          expect(Math.abs(length(h.reflected) - 1)).toBeLessThanOrEqual(1e-12);
          expect(Math.abs(dot(cross(h.ray, n), h.reflected))).toBeLessThanOrEqual(1e-12);
          // the mirror point is on the sphere, the dome point on the dome
          expect(Math.abs(length(sub(h.mirrorPoint, rig!.mirror.center)) - rig!.mirror.radius)).toBeLessThanOrEqual(1e-12 * rig!.dome.radius);
          expect(Math.abs(length(h.domePoint) - rig!.dome.radius)).toBeLessThanOrEqual(1e-12 * rig!.dome.radius);
          checked++;
        }
      }),
      { numRuns: 300 },
    );
    expect(checked).toBeGreaterThan(200);
  });

  it("Fermat: the traced mirror point makes |P−X| + |X−D| stationary along the sphere", () => {
    // Fermat's principle of stationary optical path (Hecht, "Optics", ch. 4 — from memory): moving X along the
    // sphere by ε changes the path only by O(ε²); a point ε away from it changes it at first order.
    let checked = 0;
    fc.assert(
      fc.property(rigParams, picks, num(0, 2 * Math.PI), (p, pk, turn) => {
        const rig = randomRig(p);
        fc.pre(rig !== null);
        const t = new Tracer(rig!);
        const { center: C, radius: r } = rig!.mirror;
        const P = t.frame.origin;
        for (const [x, y] of litPixels(t, pk)) {
          const h = t.pixel(x, y);
          if (h.kind === 'mirror-miss') continue;
          const X = h.mirrorPoint;
          const D = h.domePoint;
          const n = normalize(sub(X, C));
          const a = normalize(cross(n, Math.abs(n[0]) < 0.9 ? [1, 0, 0] : [0, 1, 0]));
          const b = cross(n, a);
          const tan = [0, 1, 2].map((i) => Math.cos(turn) * a[i] + Math.sin(turn) * b[i]) as Vec3;
          // perturb along the tangent plane and re-project onto the sphere
          const onSphere = (s: number): Vec3 => {
            const q = normalize([X[0] - C[0] + s * tan[0], X[1] - C[1] + s * tan[1], X[2] - C[2] + s * tan[2]]);
            return [C[0] + r * q[0], C[1] + r * q[1], C[2] + r * q[2]];
          };
          const L = (Y: Vec3) => length(sub(P, Y)) + length(sub(Y, D));
          const eps = 1e-4 * r;
          const slope = (L(onSphere(eps)) - L(onSphere(-eps))) / (2 * eps);
          const curv = Math.abs(L(onSphere(eps)) + L(onSphere(-eps)) - 2 * L(X)) / (eps * eps);
          // first derivative zero up to rounding and the O(ε²) term; second derivative bounded by the geometry
          expect(Math.abs(slope)).toBeLessThanOrEqual(1e-6);
          expect(curv).toBeLessThan(1e3 / r);
          checked++;
        }
      }),
      { numRuns: 200 },
    );
    expect(checked).toBeGreaterThan(100);
  });

  it('Fermat control: a point 1% of the radius off the reflection point is not stationary', () => {
    const rig = onAxisRig();
    const t = new Tracer(rig);
    const h = t.pixel(700, 400);
    if (h.kind === 'mirror-miss') throw new Error('expected a lit pixel');
    const { center: C, radius: r } = rig.mirror;
    const off = normalize([h.mirrorPoint[0] - C[0] + 0.01 * r, h.mirrorPoint[1] - C[1], h.mirrorPoint[2] - C[2]]);
    const Y: Vec3 = [C[0] + r * off[0], C[1] + r * off[1], C[2] + r * off[2]];
    const L = (Z: Vec3) => length(sub(t.frame.origin, Z)) + length(sub(Z, h.domePoint));
    const eps = 1e-4 * r;
    const stepX = normalize([1, 0, 0]);
    const shift = (Z: Vec3, s: number): Vec3 => {
      const q = normalize([Z[0] - C[0] + s * stepX[0], Z[1] - C[1], Z[2] - C[2]]);
      return [C[0] + r * q[0], C[1] + r * q[1], C[2] + r * q[2]];
    };
    expect(Math.abs((L(shift(Y, eps)) - L(shift(Y, -eps))) / (2 * eps))).toBeGreaterThan(1e-4);
  });
});
