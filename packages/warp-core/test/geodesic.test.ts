/**
 * Class I icosahedral geodesic domes against the handbook: chord factors, face counts and triangle
 * kinds from Kenner, *Geodesic Math and How to Use It* (1976), the tables for 2V, 3V and 4V.
 */
import { describe, expect, it } from 'vitest';
import { geodesicDome, geodesicObj, icosahedron } from '../src/optics/geodesic.js';
import { parseTriangleFile } from '../src/optics/dome-mesh-files.js';

// Kenner 1976, chord factors for radius 1 (class I icosahedral, method 1), to the five places printed
const KENNER: Record<number, number[]> = {
  2: [0.54653, 0.61803],
  3: [0.34862, 0.40355, 0.41241],
  4: [0.25318, 0.29453, 0.29524, 0.29859, 0.31287, 0.32492],
};

describe('geodesic domes (Kenner 1976)', () => {
  for (const nu of [2, 3, 4]) {
    it(`${nu}V: the chord factors of the whole sphere are the handbook's, 20ν² faces, 30ν² struts, 10ν² + 2 hubs`, () => {
      const d = geodesicDome({ frequency: nu, radius: 1 });
      // Kenner 1976: chord factors to five places
      expect(d.struts.map((s) => Number(s.chordFactor.toFixed(5)))).toEqual(KENNER[nu]);
      // Euler's formula for the subdivided icosahedron: F = 20ν², E = 30ν², V = 10ν² + 2
      expect(d.sphereTriangles).toBe(20 * nu * nu);
      expect(d.struts.reduce((a, s) => a + s.count, 0)).toBe(30 * nu * nu);
      expect(d.hubs).toBe(10 * nu * nu + 2);
    });
  }

  it('3V: two kinds of triangle, two A sides and a B, a B and two C sides (Kenner 1976)', () => {
    const d = geodesicDome({ frequency: 3, radius: 1 });
    expect(d.triangleKinds).toEqual([
      { sides: 'AAB', count: 60 },
      { sides: 'BCC', count: 120 },
    ]);
  });

  it('lengths scale with the radius; the pattern turns with azimuth, the zenith hub stays', () => {
    const d = geodesicDome({ frequency: 3, radius: 2.5 });
    expect(d.struts[0].length).toBeCloseTo(0.34862 * 2.5, 4);
    const ico = icosahedron(0.3);
    expect(ico.vertices[0]).toEqual([0, 0, 1]);
    // the first neighbour of the zenith sits at azimuth 0.3 rad (toward +x from +y)
    expect(Math.atan2(ico.vertices[1][0], ico.vertices[1][1])).toBeCloseTo(0.3, 12);
  });

  it('a hemisphere of an even frequency has a flat base at the springline; a skirt drops a wall from it', () => {
    const d = geodesicDome({ frequency: 4, radius: 2, keepAbove: 0, skirtTo: -0.5 });
    expect(d.sphereTriangles).toBe(160);
    expect(Math.abs(d.baseHeight)).toBeLessThan(1e-12);
    expect(d.skirtPanels).toBe(20);
    expect(d.indices.length / 3).toBe(160 + 40);
    let lowest = Infinity;
    for (let i = 2; i < d.positions.length; i += 3) lowest = Math.min(lowest, d.positions[i]);
    expect(lowest).toBe(-0.5);
  });

  it('the OBJ text reads back as the same triangles', () => {
    const d = geodesicDome({ frequency: 2, radius: 1, keepAbove: 0 });
    const soup = parseTriangleFile(new TextEncoder().encode(geodesicObj(d, 1, ['a test'])), 'dome.obj');
    expect(soup.indices).toEqual(d.indices);
    for (let i = 0; i < d.positions.length; i++) expect(Math.abs(soup.positions[i] - d.positions[i])).toBeLessThan(1e-9);
  });

  it('the usual cuts by fraction of the height: 3V 3/8 and 5/8 are the 75- and 105-triangle domes, 4V 1/2 the 160 (Kenner 1976)', () => {
    const faces = (nu: number, f: number) => geodesicDome({ frequency: nu, radius: 1, keepFraction: f }).sphereTriangles;
    expect(faces(3, 3 / 8)).toBe(75);
    expect(faces(3, 5 / 8)).toBe(105);
    expect(faces(4, 1 / 2)).toBe(160);
    expect(faces(2, 1 / 2)).toBe(40);
    expect(faces(3, 1)).toBe(180);
  });
});
