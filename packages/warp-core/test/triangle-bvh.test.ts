/**
 * The triangle BVH against a brute-force search over every triangle (the same Möller–Trumbore test),
 * its convexity certificate, the portals that close a convex mesh's openings, and the trace and its
 * inverse on as-built domes: the grid kernel (which uses the shortcuts) against the one-pixel trace,
 * and locate ∘ probe to 1e-6 px.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { parse } from 'yaml';
import { TriangleBvh } from '../src/optics/triangle-bvh.js';
import { DomeMesh } from '../src/optics/dome-mesh.js';
import { geodesicDome } from '../src/optics/geodesic.js';
import { seededRandom } from '../src/random.js';
import { allocGridOutput, Tracer } from '../src/trace.js';
import { locateDirection } from '../src/locate.js';
import { rigFromDocument } from '../src/rig/document.js';

/** Nearest t > tMin over every triangle, or −1: the reference the BVH must reproduce. */
function bruteForce(pos: ArrayLike<number>, idx: ArrayLike<number>, o: number[], d: number[], tMin: number): number {
  let best = Infinity;
  for (let k = 0; k < idx.length; k += 3) {
    const a = 3 * idx[k], b = 3 * idx[k + 1], c = 3 * idx[k + 2];
    const e1 = [pos[b] - pos[a], pos[b + 1] - pos[a + 1], pos[b + 2] - pos[a + 2]];
    const e2 = [pos[c] - pos[a], pos[c + 1] - pos[a + 1], pos[c + 2] - pos[a + 2]];
    const p = [d[1] * e2[2] - d[2] * e2[1], d[2] * e2[0] - d[0] * e2[2], d[0] * e2[1] - d[1] * e2[0]];
    const det = e1[0] * p[0] + e1[1] * p[1] + e1[2] * p[2];
    if (det === 0) continue;
    const s = [o[0] - pos[a], o[1] - pos[a + 1], o[2] - pos[a + 2]];
    const u = (s[0] * p[0] + s[1] * p[1] + s[2] * p[2]) / det;
    if (u < 0 || u > 1) continue;
    const q = [s[1] * e1[2] - s[2] * e1[1], s[2] * e1[0] - s[0] * e1[2], s[0] * e1[1] - s[1] * e1[0]];
    const v = (d[0] * q[0] + d[1] * q[1] + d[2] * q[2]) / det;
    if (v < 0 || u + v > 1) continue;
    const t = (e2[0] * q[0] + e2[1] * q[1] + e2[2] * q[2]) / det;
    if (t > tMin && t < best) best = t;
  }
  return best === Infinity ? -1 : best;
}

function unitRandom(rand: () => number): number[] {
  for (;;) {
    const v = [2 * rand() - 1, 2 * rand() - 1, 2 * rand() - 1];
    const l = Math.hypot(v[0], v[1], v[2]);
    if (l > 0.1 && l <= 1) return v.map((x) => x / l);
  }
}

/** A jumble of random triangles in a 4 m box: nothing convex about it. */
function soup(n: number, seed: number) {
  const rand = seededRandom(seed);
  const positions = new Float64Array(9 * n);
  const indices = new Uint32Array(3 * n);
  for (let k = 0; k < n; k++) {
    const c = [4 * rand() - 2, 4 * rand() - 2, 4 * rand() - 2];
    for (let v = 0; v < 3; v++) for (let a = 0; a < 3; a++) positions[9 * k + 3 * v + a] = c[a] + 0.6 * (rand() - 0.5);
    indices.set([3 * k, 3 * k + 1, 3 * k + 2], 3 * k);
  }
  return { positions, indices };
}

describe('TriangleBvh: the first hit, against every triangle tried', () => {
  it('random triangles, random rays: same hit or the same miss, whatever the previous ray hit', () => {
    const { positions, indices } = soup(400, 7);
    const bvh = new TriangleBvh(positions, indices);
    expect(bvh.convex).toBe(false);
    const rand = seededRandom(11);
    let hits = 0;
    for (let i = 0; i < 1500; i++) {
      const o = [3 * rand() - 1.5, 3 * rand() - 1.5, 3 * rand() - 1.5];
      const d = unitRandom(rand);
      const want = bruteForce(positions, indices, o, d, 1e-9);
      const got = bvh.firstHit(o[0], o[1], o[2], d[0], d[1], d[2], 1e-9);
      if (want < 0) expect(got, `ray ${i}`).toBe(-1);
      else {
        hits++;
        expect(Math.abs(got - want), `ray ${i}`).toBeLessThan(1e-9);
      }
    }
    expect(hits).toBeGreaterThan(300);
  });

  it('tMax bounds the search; an empty mesh meets nothing', () => {
    const bvh = new TriangleBvh([0, 0, 1, 1, 0, 1, 0, 1, 1], [0, 1, 2]);
    expect(bvh.firstHit(0.2, 0.2, 0, 0, 0, 1)).toBeCloseTo(1, 12);
    expect(bvh.firstHit(0.2, 0.2, 0, 0, 0, 1, 0, 0.5)).toBe(-1);
    expect(bvh.firstHit(0.2, 0.2, 2, 0, 0, 1)).toBe(-1);
    expect(new TriangleBvh([], []).firstHit(0, 0, 0, 0, 0, 1)).toBe(-1);
  });
});

describe('convexity certificate and portals', () => {
  const hemisphere = geodesicDome({ frequency: 4, radius: 2.5, keepAbove: 0, skirtTo: -0.5 });

  it('a geodesic hemisphere on a skirt is convex; it holds a ball clear of every face, not one touching a face', () => {
    const bvh = new TriangleBvh(hemisphere.positions, hemisphere.indices);
    expect(bvh.convex).toBe(true);
    expect(bvh.containsBall(0, -1.9, 0.15, 0.3)).toBe(true);
    expect(bvh.containsBall(0, -2.3, 0.15, 0.3)).toBe(false); // reaches past the skirt
    expect(bvh.containsBall(0, 0, 3, 0.1)).toBe(false); // outside, above the zenith
  });

  it('one hub pushed in by 10 cm makes it not convex', () => {
    const p = hemisphere.positions.slice();
    p[2] -= 0.1; // the first hub is the zenith
    expect(new TriangleBvh(p, hemisphere.indices).convex).toBe(false);
  });

  it('portals close the opening: a flat base gets a fan, the ragged base of an odd frequency its hull', () => {
    const flat = new DomeMesh(hemisphere.positions, hemisphere.indices);
    const closedFlat = flat.closedConvex()!;
    expect(closedFlat.order.length).toBe(flat.triangleCount + 20); // one fan triangle per base edge: a 4V hemisphere has 20 on its ring
    const ragged = geodesicDome({ frequency: 3, radius: 2.5, keepAbove: -0.1876 * 2.5 });
    const mesh = new DomeMesh(ragged.positions, ragged.indices);
    const closed = mesh.closedConvex();
    expect(closed).not.toBeNull();
    expect(closed!.convex).toBe(true);
    // rays from inside: meet a real triangle exactly where the brute force says, or a portal where it says none
    const rand = seededRandom(5);
    let open = 0;
    for (let i = 0; i < 1000; i++) {
      const o = [0.6 * rand() - 0.3, 0.6 * rand() - 0.3, 0.6 * rand() - 0.3];
      const d = unitRandom(rand);
      const want = bruteForce(ragged.positions, ragged.indices, o, d, 1e-9);
      const t = closed!.firstHit(o[0], o[1], o[2], d[0], d[1], d[2], 1e-9, Infinity, true);
      expect(t, `ray ${i}`).toBeGreaterThan(0); // closed: every ray from inside meets something
      if (closed!.hitTriangle >= mesh.triangleCount) {
        expect(want, `ray ${i}`).toBe(-1);
        open++;
      } else expect(Math.abs(t - want), `ray ${i}`).toBeLessThan(1e-9);
    }
    expect(open).toBeGreaterThan(100);
    expect(open).toBeLessThan(900);
  });

  it('a mesh that is not convex gets no portals', () => {
    const { positions, indices } = soup(50, 3);
    expect(new DomeMesh(positions, indices).closedConvex()).toBeNull();
  });
});

describe('the trace on as-built domes: the grid kernel and the inverse', () => {
  const doc = parse(readFileSync(fileURLToPath(new URL('../../../fixtures/demo-rig.yaml', import.meta.url)), 'utf8'));
  const rigOn = (dome: { positions: Float64Array; indices: Uint32Array }) =>
    rigFromDocument({ ...doc, dome: { ...doc.dome, mesh: 'generated.obj' } }, { loadMesh: () => dome });
  const cases = {
    // convex and closed by its hull: the grid kernel takes the shortcuts
    '3V 5/8 (ragged base)': geodesicDome({ frequency: 3, radius: 2.5, keepAbove: -0.1876 * 2.5 }),
    // the skirt under a ragged base is not convex: the general search
    '3V 5/8 on a skirt': geodesicDome({ frequency: 3, radius: 2.5, keepAbove: -0.1876 * 2.5, skirtTo: -0.5 }),
    // convex, flat base: closed by a fan
    '8V hemisphere on a skirt': geodesicDome({ frequency: 8, radius: 2.5, keepAbove: 0, skirtTo: -0.5 }),
  };

  for (const [name, dome] of Object.entries(cases)) {
    it(`${name}: the grid kernel agrees with the one-pixel trace on every 12th pixel`, () => {
      const t = new Tracer(rigOn(dome));
      if (name === '3V 5/8 on a skirt') expect(t.meshHoldsMirror).toBe(false);
      else expect(t.meshHoldsMirror).toBe(true);
      const xs = Array.from({ length: 160 }, (_, i) => 12 * i + 0.5);
      const ys = Array.from({ length: 100 }, (_, j) => 12 * j + 0.5);
      const g = t.grid(xs, ys, allocGridOutput(xs.length, ys.length, { points: true }));
      const code = { 'mirror-miss': 0, dome: 1, 'below-horizon': 2, open: 3 } as const;
      const seen = new Set<number>();
      const wrong: string[] = [];
      for (let j = 0; j < ys.length; j++) {
        for (let i = 0; i < xs.length; i++) {
          const k = j * xs.length + i;
          const h = t.pixel(xs[i], ys[j]);
          seen.add(g.kind[k]);
          if (g.kind[k] !== code[h.kind]) wrong.push(`${xs[i]},${ys[j]}: kind ${g.kind[k]} vs ${h.kind}`);
          else if (h.kind === 'dome' || h.kind === 'below-horizon') {
            const e = Math.max(Math.abs(g.u[k] - h.fisheye[0]), Math.abs(g.v[k] - h.fisheye[1]));
            if (!(e < 1e-9)) wrong.push(`${xs[i]},${ys[j]}: (u, v) off by ${e}`);
          }
        }
      }
      expect(wrong.slice(0, 5)).toEqual([]);
      expect(seen.has(1) && seen.has(3)).toBe(true);
    });

    it(`${name}: locate(probe(pixel)) gives the pixel back to 1e-6 px`, () => {
      const t = new Tracer(rigOn(dome));
      let n = 0;
      let open = 0;
      for (let y = 30.25; y < 1200; y += 97) {
        for (let x = 20.75; x < 1920; x += 89) {
          const h = t.pixel(x, y);
          if (h.kind === 'open') {
            // the eye's ray toward where that light would have gone may meet the dome or not; no claim
            open++;
            continue;
          }
          if (h.kind !== 'dome' && h.kind !== 'below-horizon') continue;
          const r = locateDirection(t, h.azimuth, h.altitude);
          expect(r.pixel, `pixel ${x},${y}: ${r.pixel === null ? r.reason : ''}`).not.toBeNull();
          expect(Math.hypot(r.pixel![0] - x, r.pixel![1] - y), `pixel ${x},${y}`).toBeLessThan(1e-6);
          n++;
        }
      }
      expect(n).toBeGreaterThan(80);
    });
  }

  it('locate toward an opening says so', () => {
    const t = new Tracer(rigOn(cases['3V 5/8 (ragged base)']));
    const r = locateDirection(t, 0, -80 * (Math.PI / 180));
    expect(r.pixel).toBeNull();
    if (r.pixel === null) expect(r.failure).toBe('open');
  });
});
