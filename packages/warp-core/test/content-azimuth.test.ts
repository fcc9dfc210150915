/**
 * content.azimuth (the dome azimuth where the content's front, the bottom of the dome master, is
 * shown) and the warp's turn of a delivered frame by any angle (DESIGN.md "Fisheye convention"). The
 * sign is pinned by a marked pixel of the dome master that must land at a known dome direction.
 */
import { describe, expect, it } from 'vitest';
import { DEG, RAD, type Vec3 } from '../src/math.js';
import { contentToWorld, worldToContent } from '../src/optics/fisheye.js';
import { RigError } from '../src/rig/model.js';
import { rigFromDocument, rigToDocument } from '../src/rig/document.js';
import { locateDirection } from '../src/locate.js';
import { orientUv, pixelMapFromRig } from '../src/mesh/pixel-map.js';
import { simulationMap } from '../src/simulate.js';
import { allocGridOutput, Tracer } from '../src/trace.js';

type Doc = Record<string, any>;

/** The rig of fixtures/vectors/vectors-a.json at a small resolution (same optics, fewer pixels). */
function doc(azimuth?: number): Doc {
  return {
    units: 'm',
    dome: { radius: 2 },
    mirror: { radius: 0.2, center: [0, -1.6, 0.25], axis: [0, 1, 0], capAngle: 90 },
    projector: { position: [0, -0.7, 0.15], lookAt: [0, -1.6, 0.3], roll: 0, resolution: [192, 108], throwRatio: 1.4, lensShift: [0, 0] },
    content: { fov: 180, ...(azimuth === undefined ? {} : { azimuth }) },
  };
}

const N = 512;
/** Where, in an N × N dome master, the content direction at (azimuth, altitude) degrees sits (the equidistant fisheye). */
function masterPoint(azDeg: number, altDeg: number): [number, number] {
  const rho = (0.5 * (90 - altDeg)) / 90;
  return [(0.5 + rho * Math.sin(azDeg * DEG)) * N, (0.5 + rho * Math.cos(azDeg * DEG)) * N];
}

/** The projector pixel (its integer index) that lights the dome direction, and its index in a map. */
function pixelFor(rig: ReturnType<typeof rigFromDocument>, azDeg: number, altDeg: number): { k: number; x: number; y: number } {
  const hit = locateDirection(new Tracer(rig), azDeg * DEG, altDeg * DEG);
  expect(hit.pixel).not.toBeNull();
  const [px, py] = hit.pixel!;
  const x = Math.floor(px);
  const y = Math.floor(py);
  return { k: y * rig.projector.resolution[0] + x, x, y };
}

describe('worldToContent and contentToWorld', () => {
  it('turn the world azimuth az into the content azimuth az − content.azimuth, and back', () => {
    const w: Vec3 = [Math.sin(100 * DEG) * 0.8, Math.cos(100 * DEG) * 0.8, 0.6];
    const c = worldToContent([0, 0, 0], w, 30 * DEG);
    expect(Math.atan2(c[0], c[1]) * RAD).toBeCloseTo(70, 12);
    expect(c[2]).toBe(0.6);
    const back = contentToWorld([0, 0, 0], c, 30 * DEG);
    for (let i = 0; i < 3; i++) expect(back[i]).toBeCloseTo(w[i], 15);
    // in place (out === d)
    const same: Vec3 = [w[0], w[1], w[2]];
    expect(worldToContent(same, same, 30 * DEG)).toBe(same);
    for (let i = 0; i < 3; i++) expect(same[i]).toBeCloseTo(c[i], 15);
  });
});

describe('content.azimuth', () => {
  it('a marked pixel at the content front (bottom of the master, 30° up) lands at dome azimuth 90 when content.azimuth is 90', () => {
    const rig = rigFromDocument(doc(90));
    const map = pixelMapFromRig(rig, [N, N]);
    const mark = masterPoint(0, 30);
    // the projector pixel lighting dome azimuth 90°, 30° up shows the mark (within the pixel's own extent on the master)
    const at = pixelFor(rig, 90, 30);
    expect(Math.hypot(map.x[at.k] - mark[0], map.y[at.k] - mark[1])).toBeLessThan(6);
    // and the one lighting the dome's front at 30° shows the content's left (azimuth 270), not its front
    const front = pixelFor(rig, 0, 30);
    const left = masterPoint(270, 30);
    expect(Math.hypot(map.x[front.k] - left[0], map.y[front.k] - left[1])).toBeLessThan(6);
    expect(Math.hypot(map.x[front.k] - mark[0], map.y[front.k] - mark[1])).toBeGreaterThan(100);
  });

  it('the trace gives the fisheye of az − content.azimuth, probe\'s azimuth stays the dome\'s', () => {
    const plain = new Tracer(rigFromDocument(doc()));
    const turned = new Tracer(rigFromDocument(doc(-45)));
    const a = plain.pixel(90.5, 36.5);
    const b = turned.pixel(90.5, 36.5);
    expect(a.kind).toBe('dome');
    if (a.kind !== 'dome' || b.kind !== 'dome') return;
    expect(b.azimuth).toBeCloseTo(a.azimuth, 14);
    const [u, v] = b.fisheye;
    const rho = Math.hypot(u - 0.5, v - 0.5);
    expect(rho).toBeCloseTo(Math.hypot(a.fisheye[0] - 0.5, a.fisheye[1] - 0.5), 14);
    // content.azimuth −45 is 315: the content azimuth is az − 315 = az + 45
    const contentAz = (Math.atan2(u - 0.5, v - 0.5) * RAD + 360) % 360;
    expect(contentAz).toBeCloseTo((a.azimuth * RAD + 45) % 360, 10);
    // the grid kernel agrees with the single-pixel trace
    const g = turned.grid(Float64Array.of(90.5), Float64Array.of(36.5), allocGridOutput(1, 1));
    expect(g.u[0]).toBeCloseTo(u, 12);
    expect(g.v[0]).toBeCloseTo(v, 12);
  });

  it('simulate puts the master\'s marked pixel back where the warp showed it', () => {
    const rig = rigFromDocument(doc(90));
    const size = 64;
    const sim = simulationMap(rig, size);
    const at = pixelFor(rig, 90, 30);
    // the simulated master's pixel at the mark samples the projector pixel that lights it
    const [mx, my] = masterPoint(0, 30).map((c) => Math.floor((c / N) * size));
    const k = my * size + mx;
    expect(Math.hypot(sim.x[k] - (at.x + 0.5), sim.y[k] - (at.y + 0.5))).toBeLessThan(4);
  });

  it('is any angle, kept in [0, 360); written back by rigToDocument; refused when not a number', () => {
    expect(rigFromDocument(doc(-90)).content.azimuth! * RAD).toBeCloseTo(270, 12);
    expect(rigFromDocument(doc(725)).content.azimuth! * RAD).toBeCloseTo(5, 12);
    expect(rigFromDocument(doc(360)).content.azimuth).toBeUndefined();
    expect(rigToDocument(rigFromDocument(doc(12.5))).content).toEqual({ fov: 180, eye: [0, 0, 0], azimuth: 12.5 });
    expect(rigToDocument(rigFromDocument(doc())).content).toEqual({ fov: 180, eye: [0, 0, 0] });
    expect(() => rigFromDocument(doc('east' as never))).toThrow(RigError);
    expect(() => rigFromDocument(doc('east' as never))).toThrow(`content.azimuth: expected an angle in degrees (the dome azimuth where the content's front is shown), got "east"`);
  });
});

describe('turning a delivered frame by any angle', () => {
  it('orientUv keeps the quarter turns exact and joins them smoothly', () => {
    for (const t of [90, 180, 270]) {
      const exact = orientUv([0.2, 0.7], { rotate: t });
      const near = orientUv([0.2, 0.7], { rotate: t + 1e-7 });
      expect(near[0]).toBeCloseTo(exact[0], 8);
      expect(near[1]).toBeCloseTo(exact[1], 8);
    }
    expect(orientUv([0.2, 0.7], { rotate: -90 })).toEqual(orientUv([0.2, 0.7], { rotate: 270 }));
  });

  it('a frame delivered turned 30° counter-clockwise, turned back with rotate 30: its marked front lands at the dome front', () => {
    const rig = rigFromDocument(doc());
    const map = pixelMapFromRig(rig, [N, N], { rotate: 30 });
    // the front (bottom) turned 30° counter-clockwise as seen moves toward the right: to where azimuth 30 was
    const mark = masterPoint(30, 30);
    const at = pixelFor(rig, 0, 30);
    expect(Math.hypot(map.x[at.k] - mark[0], map.y[at.k] - mark[1])).toBeLessThan(6);
  });

  it('content.azimuth A shows what rotate −A shows', () => {
    const small = (d: Doc) => ((d.projector.resolution = [128, 72]), d);
    const a = pixelMapFromRig(rigFromDocument(small(doc(30))), [N, N]);
    const b = pixelMapFromRig(rigFromDocument(small(doc())), [N, N], { rotate: -30 });
    let compared = 0;
    for (let k = 0; k < a.x.length; k++) {
      if (!(a.gain[k] > 0)) continue;
      compared++;
      expect(Math.abs(a.x[k] - b.x[k])).toBeLessThan(1e-3);
      expect(Math.abs(a.y[k] - b.y[k])).toBeLessThan(1e-3);
    }
    expect(compared).toBeGreaterThan(500);
  });
});
