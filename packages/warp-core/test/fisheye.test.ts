/**
 * The dome-master fisheye (DESIGN.md "Fisheye (dome master) convention") against an outside
 * implementation of the same map: proj4's polar azimuthal equidistant projection.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import proj4 from 'proj4';
import { DEG, directionFromAzAlt, type Vec3 } from '../src/math.js';
import { directionToFisheye, fisheyeToDirection, fisheyeZenithAngle } from '../src/optics/fisheye.js';

// proj4 `aeqd` on a unit sphere centred on the north pole: forward([lon, lat]) in degrees gives (x, y) in
// radians of arc from the pole (proj4js, lib/projections/aeqd.js, the polar branch).
const aeqd = proj4('+proj=aeqd +lat_0=90 +lon_0=0 +a=1 +b=1 +units=m +no_defs');

/**
 * The mapping, found empirically below ("proj4's longitude is our azimuth"): lon = azimuth (east of
 * north is clockwise seen from inside, as our azimuth is clockwise from the front), lat = altitude,
 * and proj4's y points away from lon 0 while our v points toward the front, so
 *   u = 0.5 + x / fov,  v = 0.5 − y / fov   (fov in radians; fov = π for a 180° dome master).
 */
function proj4Fisheye(azDeg: number, altDeg: number, fovRad: number): [number, number] {
  const lon = azDeg > 180 ? azDeg - 360 : azDeg;
  const [x, y] = aeqd.forward([lon, altDeg]);
  return [0.5 + x / fovRad, 0.5 - y / fovRad];
}

function fisheye(d: Vec3, fov: number): [number, number] {
  return directionToFisheye([0, 0], d, fov);
}

/** One unit in the last place of 0.5 (IEEE 754 binary64, 52-bit fraction: 2⁻¹ × 2⁻⁵²). */
const ULP_HALF = 2 ** -53;

const num = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });

describe('fisheye against proj4 aeqd (polar azimuthal equidistant)', () => {
  it('proj4 longitude is our azimuth: lon 0 → −y, lon 90 → +x (found empirically)', () => {
    // Each cardinal longitude at the equator lands a quarter turn (π/2) from the pole; the sign pattern
    // is DESIGN.md's x = (π/2 − alt)·sin az, y = −(π/2 − alt)·cos az with az = lon.
    const cases: [number, number, number][] = [
      [0, 0, -Math.PI / 2],
      [90, Math.PI / 2, 0],
      [180, 0, Math.PI / 2],
      [-90, -Math.PI / 2, 0],
    ];
    for (const [lon, x, y] of cases) {
      const [px, py] = aeqd.forward([lon, 0]);
      expect(px).toBeCloseTo(x, 12);
      expect(py).toBeCloseTo(y, 12);
    }
    // Our side of the same statement (DESIGN.md): front (az 0) at the bottom of the frame, right (az 90) on the right.
    const front = fisheye(directionFromAzAlt(0, 0), Math.PI);
    const right = fisheye(directionFromAzAlt(90 * DEG, 0), Math.PI);
    expect(front[0]).toBeCloseTo(0.5, 15);
    expect(front[1]).toBeCloseTo(1, 15);
    expect(right[0]).toBeCloseTo(1, 15);
    expect(right[1]).toBeCloseTo(0.5, 15);
  });

  it('fov 180: directionToFisheye = proj4 aeqd on random directions, to 1e-9', () => {
    fc.assert(
      fc.property(num(0, 360).filter((a) => a < 360), num(-89.9, 90), (az, alt) => {
        const [u, v] = fisheye(directionFromAzAlt(az * DEG, alt * DEG), Math.PI);
        const [pu, pv] = proj4Fisheye(az, alt, Math.PI);
        expect(Math.abs(u - pu)).toBeLessThanOrEqual(1e-9);
        expect(Math.abs(v - pv)).toBeLessThanOrEqual(1e-9);
      }),
      { numRuns: 2000 },
    );
  });

  it('any fov in (0°, 360°]: the same map scaled by 1/fov, to 1e-9', () => {
    fc.assert(
      fc.property(num(0, 360).filter((a) => a < 360), num(-89.9, 90), num(1, 360), (az, alt, fovDeg) => {
        const fov = fovDeg * DEG;
        const [u, v] = fisheye(directionFromAzAlt(az * DEG, alt * DEG), fov);
        const [pu, pv] = proj4Fisheye(az, alt, fov);
        // The coordinates grow as 1/fov, so compare relative to the distance from the centre.
        const scale = Math.max(1, Math.hypot(pu - 0.5, pv - 0.5));
        expect(Math.abs(u - pu)).toBeLessThanOrEqual(1e-9 * scale);
        expect(Math.abs(v - pv)).toBeLessThanOrEqual(1e-9 * scale);
      }),
      { numRuns: 1000 },
    );
  });
});

describe('fisheye round trips (d3-geo invert-test style)', () => {
  it('fisheyeToDirection ∘ directionToFisheye = identity on random directions and fovs, to 1e-9', () => {
    fc.assert(
      fc.property(num(0, 360), num(-89, 90), num(10, 360), (az, alt, fovDeg) => {
        const fov = fovDeg * DEG;
        const d = directionFromAzAlt(az * DEG, alt * DEG);
        const [u, v] = fisheye(d, fov);
        const back = fisheyeToDirection([0, 0, 0], u, v, fov);
        for (let i = 0; i < 3; i++) expect(Math.abs(back[i] - d[i])).toBeLessThanOrEqual(1e-9);
      }),
      { numRuns: 2000 },
    );
  });

  it('directionToFisheye ∘ fisheyeToDirection = identity inside the disc (angle from zenith < 180°)', () => {
    fc.assert(
      fc.property(num(0, 1), num(0, 1), num(10, 360), (u, v, fovDeg) => {
        const fov = fovDeg * DEG;
        fc.pre(fisheyeZenithAngle(u, v, fov) < Math.PI - 1e-3);
        const d = fisheyeToDirection([0, 0, 0], u, v, fov);
        expect(Math.hypot(d[0], d[1], d[2])).toBeCloseTo(1, 12);
        const [u2, v2] = fisheye(d, fov);
        expect(Math.abs(u2 - u)).toBeLessThanOrEqual(1e-9);
        expect(Math.abs(v2 - v)).toBeLessThanOrEqual(1e-9);
      }),
      { numRuns: 2000 },
    );
  });
});

describe('fisheye singular places (STYLE.md 7)', () => {
  it('the zenith maps to exactly (0.5, 0.5) for any fov, and back to +z', () => {
    for (const fovDeg of [90, 180, 190, 220, 360]) {
      expect(fisheye([0, 0, 1], fovDeg * DEG)).toEqual([0.5, 0.5]);
      // directionFromAzAlt(az, 90°) leaves cos(π/2) ≈ 6e-17 in x, y: still the centre
      const [u, v] = fisheye(directionFromAzAlt(123 * DEG, 90 * DEG), fovDeg * DEG);
      expect(Math.abs(u - 0.5)).toBeLessThan(1e-15);
      expect(Math.abs(v - 0.5)).toBeLessThan(1e-15);
      expect(fisheyeToDirection([9, 9, 9], 0.5, 0.5, fovDeg * DEG)).toEqual([0, 0, 1]);
    }
  });

  it('near the zenith (1e-8 rad off it) the map keeps 1e-9 accuracy', () => {
    // θ = acos(v_z) has an absolute error of up to √(2·eps) ≈ 1.5e-8 rad where v_z rounds to 1; the
    // well-conditioned form is θ = atan2(√(v_x²+v_y²), v_z) (common practice; three.js Spherical.setFromCartesianCoords).
    for (const off of [5e-9, 1e-8, 1.5e-8]) {
      for (const az of [0, 37, 90, 200]) {
        const alt = 90 - off / DEG;
        const [u, v] = fisheye(directionFromAzAlt(az * DEG, alt * DEG), Math.PI);
        const [pu, pv] = proj4Fisheye(az, alt, Math.PI);
        expect(Math.abs(u - pu), `az ${az}, ${off} rad from the zenith`).toBeLessThanOrEqual(1e-9);
        expect(Math.abs(v - pv), `az ${az}, ${off} rad from the zenith`).toBeLessThanOrEqual(1e-9);
      }
    }
  });

  it('fov 180: altitude 0 lands on the rim, radius 0.5 to the last bit, and the rim maps back to the horizon', () => {
    fc.assert(
      fc.property(num(0, 360), (az) => {
        const [u, v] = fisheye(directionFromAzAlt(az * DEG, 0), Math.PI);
        // u − 0.5, v − 0.5 and the hypot each round once: up to a few units in the last place of 0.5 (2.22e-16 = 2 ulp seen).
        expect(Math.abs(Math.hypot(u - 0.5, v - 0.5) - 0.5)).toBeLessThanOrEqual(4 * ULP_HALF);
        const d = fisheyeToDirection([0, 0, 0], u, v, Math.PI);
        expect(Math.abs(d[2])).toBeLessThan(1e-15);
      }),
      { numRuns: 500 },
    );
    // The rim's cardinal points, exactly as DESIGN.md draws them: front bottom, right right, back top, left left.
    const close = (a: [number, number], b: [number, number]) => {
      expect(a[0]).toBeCloseTo(b[0], 15);
      expect(a[1]).toBeCloseTo(b[1], 15);
    };
    close(fisheye([0, 1, 0], Math.PI), [0.5, 1]);
    close(fisheye([1, 0, 0], Math.PI), [1, 0.5]);
    close(fisheye([0, -1, 0], Math.PI), [0.5, 0]);
    close(fisheye([-1, 0, 0], Math.PI), [0, 0.5]);
  });

  it('fov ≠ 180: the rim is at fov/2 from the zenith, the horizon at 0.5·90°/(fov/2)', () => {
    // fov 190 (a tilted-dome master): the horizon sits inside the rim, the rim is 5° below it.
    const h190 = fisheye(directionFromAzAlt(0, 0), 190 * DEG);
    expect(h190[1] - 0.5).toBeCloseTo((0.5 * 90) / 95, 14);
    const rim190 = fisheye(directionFromAzAlt(0, -5 * DEG), 190 * DEG);
    expect(rim190[1] - 0.5).toBeCloseTo(0.5, 14);
    // fov 120: the horizon lies outside the circle (ρ = 0.75); 60° from the zenith is the rim.
    const h120 = fisheye(directionFromAzAlt(90 * DEG, 0), 120 * DEG);
    expect(h120[0] - 0.5).toBeCloseTo(0.75, 14);
    expect(fisheye(directionFromAzAlt(90 * DEG, 30 * DEG), 120 * DEG)[0] - 0.5).toBeCloseTo(0.5, 14);
    // fov 360: the whole sphere; the rim is the nadir, from any azimuth.
    const nadirish = fisheye(directionFromAzAlt(270 * DEG, -90 * DEG + 1e-6), 2 * Math.PI);
    expect(Math.hypot(nadirish[0] - 0.5, nadirish[1] - 0.5)).toBeCloseTo(0.5, 6);
    const nadir = fisheye([0, 0, -1], 2 * Math.PI);
    expect(Math.hypot(nadir[0] - 0.5, nadir[1] - 0.5)).toBeCloseTo(0.5, 15);
    const down = fisheyeToDirection([0, 0, 0], 0.5, 1, 2 * Math.PI);
    expect(down[2]).toBeCloseTo(-1, 15);
  });

  it('the dome-master pixel grid: u = i/N at the left edge of pixel column i (DESIGN.md)', () => {
    // A 4096² master: the zenith is the corner shared by pixels (2047, 2047) and (2048, 2048).
    const N = 4096;
    const [u, v] = fisheye([0, 0, 1], Math.PI);
    expect(u * N).toBe(2048);
    expect(v * N).toBe(2048);
  });
});
