/**
 * Stray light on an as-built dome (issue 12): the report's spill and safety figures follow the
 * triangles (the skirt, the facets), not the nominal sphere; light through an opening lands on the
 * floor or, past it, is no picture.
 */
import { describe, expect, it } from 'vitest';
import { landing } from '../src/analysis/light.js';
import { sampleFrame } from '../src/analysis/sample.js';
import { spillFigures, strayLandings } from '../src/analysis/spill.js';
import { geodesicDome } from '../src/optics/geodesic.js';
import { rigFromDocument } from '../src/rig/document.js';
import { HitKind, Tracer } from '../src/trace.js';
import type { Vec3 } from '../src/math.js';

const FT = 0.3048;
const R = 9 * FT;
const FLOOR = 2 * FT;

/** The school demo rig (fixtures/school-dome-rig.yaml) in metres, its 4V dome on a 2 ft wall generated here. */
function schoolRig(skirt = true) {
  const dome = geodesicDome({ frequency: 4, radius: R, keepAbove: 0, skirtTo: skirt ? -FLOOR : undefined });
  const IN = 0.0254;
  const doc = {
    units: 'm',
    dome: { radius: R, floor: FLOOR, mesh: 'school.obj' },
    mirror: { radius: FT, center: [0, -7 * FT, 6 * IN], axis: [0, 1, 1], capAngle: 90 },
    projector: { position: [0, -(2 * FT + 8 * IN), 4 * IN], lookAt: [0, -7 * FT, 11 * IN], roll: 0, resolution: [192, 108], throwRatio: 1.6, lensShift: [0, 0] },
    content: { fov: 180 },
  };
  return rigFromDocument(doc, { loadMesh: () => dome });
}

describe('landing on an as-built dome', () => {
  const rig = schoolRig();
  const mesh = rig.dome.mesh!;

  it('meets the triangles, not the sphere: a facet lies inside the sphere it is inscribed in', () => {
    const o: Vec3 = [0, 0, 0.5];
    const d: Vec3 = [0.3, 0.5, 0.4];
    const n = Math.hypot(...d);
    for (let i = 0; i < 3; i++) d[i] /= n;
    const onMesh = landing(o, d, R, FLOOR, mesh);
    const onSphere = landing(o, d, R, FLOOR);
    const t = mesh.firstHit(o, d);
    expect(t).toBeGreaterThan(0);
    for (let i = 0; i < 3; i++) expect(onMesh.point[i]).toBeCloseTo(o[i] + t * d[i], 12);
    expect(Math.hypot(...onMesh.point)).toBeLessThan(R - 1e-4);
    expect(Math.hypot(...onSphere.point)).toBeCloseTo(R, 12);
    expect(onMesh.surface).toBe('dome');
  });

  it('below the springline: the skirt is a wall, and the floor where it comes first', () => {
    const wall = landing([0, 0, 0], [0.9950371902, 0, -0.0995037190], R, FLOOR, mesh);
    expect(wall.surface).toBe('wall');
    expect(wall.point[2]).toBeLessThan(0);
    expect(wall.point[2]).toBeGreaterThan(-FLOOR);
    const floor = landing([0, 0, 0], [0, 0.6, -0.8], R, FLOOR, mesh);
    expect(floor.surface).toBe('floor');
    expect(floor.point[2]).toBeCloseTo(-FLOOR, 12);
  });

  it('through an opening (a dome with no wall) the light is marked as such; the floor inside the dome is no opening', () => {
    const open = schoolRig(false).dome.mesh!;
    const out = landing([0, 0, 0], [0.9950371902, 0, -0.0995037190], R, FLOOR, open);
    expect(out.throughOpening).toBe(true);
    // steeper, the light meets the floor inside the dome's footprint, with or without the wall
    for (const m of [open, mesh]) {
      const l = landing([0, 0, 0], [0.8, 0, -0.6], R, FLOOR, m);
      expect(l.throughOpening).toBeUndefined();
      expect(l.surface).toBe('floor');
      expect(l.point[0]).toBeCloseTo((0.8 * FLOOR) / 0.6, 12);
    }
  });
});

describe('spill figures on the school dome', () => {
  it('every stray landing on the dome or the wall is on the mesh, and some differ from the sphere by centimetres', () => {
    const rig = schoolRig();
    const s = sampleFrame(new Tracer(rig), { vertices: 3000 });
    const landings = strayLandings(s);
    let onMesh = 0;
    let moved = 0;
    for (let k = 0; k < landings.length; k++) {
      const l = landings[k];
      if (l === null || l.surface === 'floor' || l.throughOpening) continue;
      const d: Vec3 = [l.point[0] - l.from[0], l.point[1] - l.from[1], l.point[2] - l.from[2]];
      const len = Math.hypot(...d);
      for (let i = 0; i < 3; i++) d[i] /= len;
      // the landing is the first triangle along its own ray
      expect(rig.dome.mesh!.firstHit(l.from, d)).toBeCloseTo(len, 9);
      onMesh++;
      const sphere = landing(l.from, d, R, FLOOR);
      if (Math.hypot(sphere.point[0] - l.point[0], sphere.point[1] - l.point[1], sphere.point[2] - l.point[2]) > 0.01) moved++;
      if (s.kind[k] === HitKind.BelowHorizon) expect(l.point[2]).toBeLessThan(1e-9);
    }
    expect(onMesh).toBeGreaterThan(100);
    expect(moved).toBeGreaterThan(10);
    const f = spillFigures(s, landings);
    expect(f.heightsFrom).toBe('floor');
    expect(f.pastMirror.share).toBeGreaterThan(0);
    // the stray light's heights lie between the floor and the dome's top
    for (const part of [f.pastMirror, f.belowHorizon]) {
      if (part.heights === null) continue;
      expect(part.heights[0]).toBeGreaterThanOrEqual(-1e-9);
      expect(part.heights[1]).toBeLessThanOrEqual(FLOOR + R + 1e-9);
    }
  });
});
