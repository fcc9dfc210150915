/**
 * Random valid rigs for the property tests (optics.test.ts, trace.test.ts): the parameters as
 * fast-check arbitraries and the rig they describe, in metres.
 */
import fc from 'fast-check';
import { normalize, sub, type Vec3 } from '../src/math.js';
import { RigError, type Rig } from '../src/rig/model.js';
import { rigFromDocument } from '../src/rig/document.js';

export const num = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });
export const vec = (lo: number, hi: number) => fc.tuple(num(lo, hi), num(lo, hi), num(lo, hi));
export const unitVec = vec(-1, 1)
  .filter((v) => Math.hypot(v[0], v[1], v[2]) > 0.1)
  .map((v) => normalize(v as Vec3));

/** The rig's geometry (sphere radii, the projector's place and lens); the content keeps the document defaults. */
const RIG_ARBITRARIES = {
  R: num(1.5, 12),
  r: num(0.03, 0.15),
  cAz: num(0, 360),
  cAlt: num(-30, 60),
  cDist: num(0, 0.8),
  pDir: unitVec,
  pDist: num(1.3, 6),
  axisJitter: vec(-0.7, 0.7),
  capAngle: num(30, 180),
  lookJitter: vec(-0.5, 0.5),
  roll: num(-180, 180),
  throwRatio: num(0.6, 3),
  shift: fc.tuple(num(-0.4, 0.4), num(-0.4, 0.4)),
  res: fc.tuple(fc.integer({ min: 320, max: 3840 }), fc.integer({ min: 200, max: 2160 })),
};
export const rigParams = fc.record(RIG_ARBITRARIES);
export type RigParams = typeof rigParams extends fc.Arbitrary<infer T> ? T : never;

/** As `rigParams`, with the content's eye (a share of the dome radius) and field of view drawn too. */
export const rigParamsWithContent = fc.record({ ...RIG_ARBITRARIES, eye: vec(-0.3, 0.3), fov: num(120, 360) });
export type RigParamsWithContent = typeof rigParamsWithContent extends fc.Arbitrary<infer T> ? T : never;

/** A valid rig from random parameters, or null when they break a geometry rule. */
export function randomRig(p: RigParams & { eye?: readonly number[]; fov?: number }): Rig | null {
  const r = p.r * p.R;
  const ca = (p.cAlt * Math.PI) / 180;
  const cz = (p.cAz * Math.PI) / 180;
  const dist = p.cDist * (p.R - r);
  const C: Vec3 = [dist * Math.cos(ca) * Math.sin(cz), dist * Math.cos(ca) * Math.cos(cz), dist * Math.sin(ca)];
  const P: Vec3 = [C[0] + p.pDist * r * p.pDir[0], C[1] + p.pDist * r * p.pDir[1], C[2] + p.pDist * r * p.pDir[2]];
  const toP = normalize(sub(P, C));
  const axis = [toP[0] + p.axisJitter[0], toP[1] + p.axisJitter[1], toP[2] + p.axisJitter[2]];
  const lookAt = [C[0] + p.lookJitter[0] * r, C[1] + p.lookJitter[1] * r, C[2] + p.lookJitter[2] * r];
  try {
    return rigFromDocument({
      units: 'm',
      dome: { radius: p.R },
      mirror: { radius: r, center: C, axis, capAngle: p.capAngle },
      projector: { position: P, lookAt, roll: p.roll, resolution: p.res, throwRatio: p.throwRatio, lensShift: p.shift },
      ...(p.eye && p.fov !== undefined ? { content: { fov: p.fov, eye: p.eye.map((x) => x * p.R) } } : {}),
    });
  } catch (e) {
    if (e instanceof RigError) return null;
    throw e;
  }
}
