/**
 * Coverage: the share of the dome's solid angle (seen from the content's eye, within the content's
 * field of view) that the projector lights. Two independent ways: from the projector side (the lit
 * cells' solid angles, `sample.ts`) and from the dome side (dome directions sampled on an
 * azimuth × zenith-angle grid and sent through the inverse, `locateDirection`).
 */
import { directionFromAzAlt, RAD } from '../math.js';
import { domePointSeen, locateDirection } from '../locate.js';
import type { Tracer } from '../trace.js';
import { segmentHitsBody } from './body.js';

/** Does the ray from the eye along w meet the dome at or above the springline? */
function onDome(tracer: Tracer, az: number, alt: number): boolean {
  const D = domePointSeen(tracer, directionFromAzAlt(az, alt));
  return D !== null && D[2] >= 0;
}

function isOrigin(e: readonly number[]): boolean {
  return e[0] === 0 && e[1] === 0 && e[2] === 0;
}

/**
 * Solid angle (sr) of the directions from the eye that fall within the content's fov and meet the dome
 * at or above the springline: 2π(1 − cos min(fov/2, 90°)) for an eye at the dome centre, otherwise a
 * midpoint quadrature.
 */
export function contentSolidAngle(tracer: Tracer): number {
  const half = Math.min(tracer.rig.content.fov / 2, Math.PI);
  if (isOrigin(tracer.rig.content.eye) && !tracer.rig.dome.mesh) return 2 * Math.PI * (1 - Math.cos(Math.min(half, Math.PI / 2)));
  const nAz = 360;
  const nT = 720;
  const dT = half / nT;
  let sum = 0;
  for (let a = 0; a < nAz; a++) {
    const az = ((a + 0.5) * 2 * Math.PI) / nAz;
    for (let t = 0; t < nT; t++) {
      const theta = (t + 0.5) * dT;
      if (onDome(tracer, az, Math.PI / 2 - theta)) sum += Math.sin(theta);
    }
  }
  return (sum * dT * 2 * Math.PI) / nAz;
}

/**
 * Coverage as a share of the content's dome: the lit solid angle over the content's. The lit solid
 * angle from the projector side is an estimate (spherical triangles over the cells, the edge cells'
 * last split estimated from a corner's density), the content's is exact; when the whole content is
 * lit, the estimate's error — a few tenths of a percent where few frame vertices land on the content,
 * as in a far projector that lights a sliver of its frame — put the ratio above 1, and a search that
 * maximises coverage seeks out those errors. A share of the content is at most all of it.
 */
export function coverageShare(litSolidAngle: number, contentAngle: number): number {
  if (!(contentAngle > 0) || !(litSolidAngle > 0)) return 0;
  return Math.min(1, litSolidAngle / contentAngle);
}

export interface AzimuthCoverage {
  /** Degrees. */
  azimuth: number;
  /** Lowest and highest lit altitude along this azimuth (degrees), null when nothing is lit there. */
  lowest: number | null;
  highest: number | null;
  /** Unlit altitude intervals [from, to] (degrees) between the lowest dome altitude and the zenith. */
  gaps: [number, number][];
}

export interface DirectionCoverage {
  /** Share of the content's dome solid angle that is lit (the inverse way). */
  fraction: number;
  /** Share hidden by the projector's body (0 without a body). */
  shadowFraction: number;
  byAzimuth: AzimuthCoverage[];
  samples: number;
}

export interface DirectionCoverageOptions {
  /** Azimuth samples around the circle. */
  azimuths: number;
  /** Zenith-angle samples from the zenith to the content's edge. */
  zenithSteps: number;
  /** Report every n-th azimuth in `byAzimuth`. */
  reportEvery: number;
}

export const DIRECTION_COVERAGE_DEFAULTS: Readonly<DirectionCoverageOptions> = { azimuths: 360, zenithSteps: 180, reportEvery: 5 };

/**
 * Coverage by sampling dome directions (midpoints in zenith angle, weighted by sin θ) and asking the
 * inverse which projector pixel lights each; a direction counts as lit when a pixel inside the frame
 * lights it and the body does not block the reflected light.
 */
export function coverageFromDirections(tracer: Tracer, options: Partial<DirectionCoverageOptions> = {}): DirectionCoverage {
  const o = { ...DIRECTION_COVERAGE_DEFAULTS, ...options };
  const half = Math.min(tracer.rig.content.fov / 2, Math.PI);
  const dT = half / o.zenithSteps;
  const body = tracer.rig.projector.body;
  let all = 0;
  let lit = 0;
  let shadow = 0;
  const byAzimuth: AzimuthCoverage[] = [];
  for (let a = 0; a < o.azimuths; a++) {
    const az = (a * 2 * Math.PI) / o.azimuths;
    let lowest: number | null = null;
    let highest: number | null = null;
    const gaps: [number, number][] = [];
    let gapStart: number | null = null;
    let prevAlt = Number.NaN;
    // from the lowest dome altitude up to the zenith, so gaps read bottom to top
    for (let t = o.zenithSteps - 1; t >= 0; t--) {
      const theta = (t + 0.5) * dT;
      const alt = Math.PI / 2 - theta;
      if (!onDome(tracer, az, alt)) continue;
      const w = Math.sin(theta);
      all += w;
      const r = locateDirection(tracer, az, alt, 1e-7);
      let isLit = r.pixel !== null;
      if (r.pixel !== null && body && segmentHitsBody(body, tracer.frame, r.mirrorPoint, r.domePoint)) {
        isLit = false;
        shadow += w;
      }
      const altDeg = alt * RAD;
      if (isLit) {
        lit += w;
        if (lowest === null) lowest = altDeg;
        highest = altDeg;
        if (gapStart !== null) {
          gaps.push([gapStart, (prevAlt + altDeg) / 2]);
          gapStart = null;
        }
      } else if (gapStart === null) {
        gapStart = Number.isNaN(prevAlt) ? Math.max(0, altDeg - (dT * RAD) / 2) : (prevAlt + altDeg) / 2;
      }
      prevAlt = altDeg;
    }
    if (gapStart !== null) gaps.push([gapStart, 90]); // open up to the zenith
    if (a % o.reportEvery === 0) byAzimuth.push({ azimuth: round2(az * RAD), lowest: lowest === null ? null : round2(lowest), highest: highest === null ? null : round2(highest), gaps: gaps.map(([p, q]) => [round2(p), round2(q)]) });
  }
  return { fraction: all > 0 ? lit / all : 0, shadowFraction: all > 0 ? shadow / all : 0, byAzimuth, samples: o.azimuths * o.zenithSteps };
}

function round2(x: number): number {
  return Math.round(x * 100) / 100;
}
