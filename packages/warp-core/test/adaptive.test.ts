/**
 * The adaptive mesh (issue 11): a restricted quadtree with 2:1 balance and crack-free triangles, split
 * where the measured error exceeds the tolerance, down to the smallest cell; held to the tolerance over
 * the lit area with no more vertices than the uniform grid at the same tolerance.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { adaptiveLattice, buildAdaptiveMesh, gridAsTriangles, measureTriangles, quadtreeMesh, rasterTriangles, type TriangleWarpMesh } from '../src/mesh/adaptive.js';
import { BAKE_DEFAULTS, bakeMesh } from '../src/mesh/bake.js';
import { litTest } from '../src/mesh/edge.js';
import { contentVisible, referenceArea } from '../src/mesh/grid-samples.js';
import { rigFromDocument } from '../src/rig/document.js';
import { Tracer } from '../src/trace.js';
import { createMesh } from '../src/mesh/mesh.js';

const RIG = fileURLToPath(new URL('../../../fixtures/golden/warp-rig-320x200.yaml', import.meta.url));

/** Every interior edge shared by exactly two triangles, every border edge on the frame's border: no crack, no T-junction. */
function checkWatertight(m: TriangleWarpMesh): void {
  const edges = new Map<string, number>();
  for (let t = 0; t < m.indices.length; t += 3)
    for (let e = 0; e < 3; e++) {
      const a = m.indices[t + e];
      const b = m.indices[t + ((e + 1) % 3)];
      const key = a < b ? `${a},${b}` : `${b},${a}`;
      edges.set(key, (edges.get(key) ?? 0) + 1);
    }
  for (const [key, count] of edges) {
    if (count === 2) continue;
    const [a, b] = key.split(',').map(Number);
    const onBorder = (p: number) => m.x[p] === 0 || m.y[p] === 0 || m.x[p] === m.width || m.y[p] === m.height;
    const sameSide = (m.x[a] === m.x[b] && (m.x[a] === 0 || m.x[a] === m.width)) || (m.y[a] === m.y[b] && (m.y[a] === 0 || m.y[a] === m.height));
    if (count !== 1 || !onBorder(a) || !onBorder(b) || !sameSide) expect.fail(`edge ${key} is used ${count} times`);
  }
  // counter-clockwise seen from +z with y up = negative signed area with y down, as the grid's triangles
  let area = 0;
  for (let t = 0; t < m.indices.length; t += 3) {
    const [a, b, c] = [m.indices[t], m.indices[t + 1], m.indices[t + 2]];
    const s = (m.x[b] - m.x[a]) * (m.y[c] - m.y[a]) - (m.x[c] - m.x[a]) * (m.y[b] - m.y[a]);
    if (!(s < 0)) expect.fail(`triangle ${t / 3} is not counter-clockwise seen from +z`);
    area -= s / 2;
  }
  expect(area).toBeCloseTo(m.width * m.height, 3);
}

describe('the quadtree on a made-up field', () => {
  // a 64 × 64 lattice (one root) over a 64 × 64 frame, u growing as x², so only the right needs small cells
  const W = 64;
  const f = createMesh(65, 65, W, W);
  for (let r = 0; r <= 64; r++)
    for (let c = 0; c <= 64; c++) {
      const k = r * 65 + c;
      f.u[k] = 0.2 + 0.3 * (c / 64) + 0.3 * (c / 64) ** 4;
      f.v[k] = 0.2 + 0.5 * (r / 64);
      f.mask[k] = 1;
    }

  it('splits where the error is, balances 2:1 and leaves no crack', () => {
    const m = quadtreeMesh(f, [1, 1], 0.1, 4096);
    checkWatertight(m);
    // smaller cells to the right, where u bends most: more vertices in the right half than the left
    const right = Array.from(m.x).filter((x) => x > 32).length;
    const left = Array.from(m.x).filter((x) => x < 32).length;
    expect(right).toBeGreaterThan(left);
    expect(m.x.length).toBeLessThan(65 * 65);
    // the interpolation error at every pixel centre within the tolerance (v is linear: u alone errs)
    let worst = 0;
    rasterTriangles(m, (k, a, b, c, wa, wb, wc) => {
      const i = k % W;
      const x = (i + 0.5) / 64;
      const u = wa * m.u[a] + wb * m.u[b] + wc * m.u[c];
      const exact = 0.2 + 0.3 * x + 0.3 * x ** 4;
      // Jacobian ∂u/∂x·N in dome-master px per projector px; error in projector px = du / slope
      const slope = (4096 * (0.3 + 1.2 * x ** 3)) / 64;
      worst = Math.max(worst, (Math.abs(u - exact) * 4096) / slope);
    });
    expect(worst).toBeLessThan(0.1);
  });

  it('a lattice that is not whole roots is refused', () => {
    expect(() => quadtreeMesh(createMesh(33, 33, 32, 32), [1, 1], 0.5, 4096)).toThrow(/Expected a lattice of 65×65/);
  });
});

describe('the adaptive mesh of the golden rig', () => {
  const rig = rigFromDocument(parse(readFileSync(RIG, 'utf8')));
  const tracer = new Tracer(rig);
  const lit = litTest(tracer);
  const o = { ...BAKE_DEFAULTS };
  const areaMax = referenceArea(tracer);
  // a small projector puts much of its lit area beside the silhouette: half-pixel smallest cells
  const adaptive = buildAdaptiveMesh(tracer, { ...o, smallestCell: 0.5 }, areaMax, {}, lit);
  const g = tracer.frameGrid({});
  const litAt = new Uint8Array(320 * 200);
  for (let k = 0; k < litAt.length; k++) litAt[k] = contentVisible(tracer, g.u[k], g.v[k], g.kind[k]) ? 1 : 0;

  it('is crack-free and counter-clockwise', () => checkWatertight(adaptive));

  it('meets the tolerance over 99.9% of the lit area, silhouette included, with fewer vertices than the uniform grid', () => {
    const a = measureTriangles(adaptive, g, litAt, o.masterSize, o.tolerance);
    const uniform = bakeMesh(rig, o).mesh;
    const u = measureTriangles(gridAsTriangles(uniform), g, litAt, o.masterSize, o.tolerance);
    expect(a.pixels).toBeGreaterThan(0.99 * litAt.reduce((s, x) => s + x, 0));
    expect(a.withinTolerance).toBeGreaterThanOrEqual(0.999);
    expect(a.vertices).toBeLessThanOrEqual(uniform.cols * uniform.rows);
    // and better than the uniform grid over the lit area, which cannot meet it beside the silhouette
    expect(a.withinTolerance).toBeGreaterThan(u.withinTolerance);
  });

  it('the lattice covers the frame in whole roots', () => {
    const l = adaptiveLattice(320, 200, 1);
    expect([l.cols, l.rows, l.roots]).toEqual([321, 257, [5, 4]]);
  });
});
