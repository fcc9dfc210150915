/**
 * The bake (issue 3): brightness from the dome area per pixel against the paraxial mirror equation,
 * the reported interpolation error against an independent dense check, and the brightness factor and
 * mask rules of DESIGN.md "Brightness" and "The warp mesh and its files".
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { bakeMesh, BAKE_DEFAULTS } from '../src/mesh/bake.js';
import { brightnessFactor, domeAreaOnGrid, quantile, referenceArea } from '../src/mesh/grid-samples.js';
import { rigFromDocument } from '../src/rig/document.js';
import { Tracer, allocGridOutput } from '../src/trace.js';
import { type Rig } from '../src/rig/model.js';
import { type WarpMesh } from '../src/mesh/mesh.js';

const DEMO_RIG = fileURLToPath(new URL('../../../fixtures/demo-rig.yaml', import.meta.url));
const demoRig = (over: Record<string, unknown> = {}): Rig => {
  const doc = parse(readFileSync(DEMO_RIG, 'utf8')) as Record<string, Record<string, unknown>>;
  for (const [section, fields] of Object.entries(over)) doc[section] = { ...doc[section], ...(fields as object) };
  return rigFromDocument(doc);
};

/** An independent seeded generator (xorshift32), deliberately not the project's own. */
function xorshift(seed: number): () => number {
  let s = seed >>> 0 || 1;
  return () => {
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    return s / 4294967296;
  };
}

/** A projector on the axis of a convex mirror (centre at the origin, axis +z), looking straight down at the pole. */
function paraxialRig(r: number, s: number, R: number, T: number): Rig {
  return rigFromDocument({
    dome: { radius: R },
    mirror: { radius: r, center: [0, 0, 0], axis: [0, 0, 1], capAngle: 90 },
    // the optical axis is vertical, so `up` names the picture's up; the lens sits s above the pole
    projector: { position: [0, 0, r + s], lookAt: [0, 0, 0], up: [0, 1, 0], resolution: [1920, 1200], throwRatio: T },
  });
}

describe('paraxial brightness against the mirror equation', () => {
  // Mirror equation for a spherical mirror, 1/s + 1/s' = 1/f with f = −r/2 for a convex mirror
  // (any optics handbook, e.g. Hecht, "Optics", Sec. 5.4; real-is-positive sign convention).
  const virtualImage = (r: number, s: number) => 1 / (-2 / r - 1 / s); // s' < 0: behind the mirror

  const cases = [
    { r: 0.3, s: 1.0, R: 20, T: 1.6 },
    { r: 0.3, s: 0.5, R: 20, T: 1.0 },
    { r: 0.2, s: 1.2, R: 8, T: 2.0 },
  ];

  it.each(cases)('reflected rays near the axis come from the virtual image of the lens (r $r, s $s)', ({ r, s, R, T }) => {
    const t = new Tracer(paraxialRig(r, s, R, T));
    const sp = virtualImage(r, s);
    // Two pixels a few pixels off the axis: the backward extension of each reflected ray crosses the
    // axis at the pole + s' (z = r + s' here), to first order in the ray angle.
    for (const [x, y] of [
      [960 + 8, 600],
      [960, 600 - 6],
    ]) {
      const h = t.pixel(x, y);
      if (h.kind === 'mirror-miss') throw new Error('expected the pole region to reflect');
      const X = h.mirrorPoint;
      const d = h.reflected;
      const rho = Math.hypot(X[0], X[1]);
      const dRho = (X[0] * d[0] + X[1] * d[1]) / rho; // radial component of the reflected direction
      const zCross = X[2] - (rho / dRho) * d[2]; // where the line through X along −d meets the axis
      expect(Math.abs(zCross - (r + sp))).toBeLessThan(1e-3 * Math.abs(sp));
    }
  });

  /**
   * The paraxial dome area per projector pixel on the axis of a rig made by paraxialRig.
   * Approximations: first order in the ray angle (paraxial: no spherical aberration, the mirror's sag
   * over the beam neglected), the dome patch flat and met at normal incidence. All vanish on the axis
   * itself; a few pixels off they are second order (one pixel is 1/(T·W) ≈ 3e-4 rad).
   */
  function paraxialArea(r: number, s: number, R: number, T: number, W = 1920): number {
    const sp = virtualImage(r, s);
    // Solid angle of one pixel on the optical axis: the pinhole model of DESIGN.md puts pixel steps of
    // 1/(T·W) in the tangent plane at unit distance, so Ω = (1/(T·W))² (cos³ = 1 on the axis).
    const omega = (1 / (T * W)) ** 2;
    // Angular magnification of the beam by the convex mirror: a ray at angle α meets the mirror at
    // height s·α and leaves as if from the virtual image, at angle s·α/|s'| (paraxial; handbook as above),
    // so the solid angle grows by (s/|s'|)².
    const m = s / Math.abs(sp);
    // The reflected axis ray runs back up the axis to the zenith, normal to the dome there; the virtual
    // source sits |s'| below the pole (z = r), so its distance to the dome is R − r + |s'|.
    const L = R - r + Math.abs(sp);
    return m * m * omega * L * L;
  }

  it.each(cases)("dome area per pixel near the axis = (s/|s'|)² · Ω_pixel · (distance from the virtual source)² (r $r, s $s, R $R)", ({ r, s, R, T }) => {
    const t = new Tracer(paraxialRig(r, s, R, T));
    const predicted = paraxialArea(r, s, R, T);
    // On the axis the approximations vanish: agreement to the central difference's rounding.
    const onAxis = domeAreaOnGrid(t, [960], [600])[0];
    expect(Math.abs(onAxis / predicted - 1)).toBeLessThan(1e-4);
    // Pixels 5 to 40 px off the axis (a separable 3×3 grid around it) agree to well within 1%.
    const near = domeAreaOnGrid(t, [960 + 10, 960 - 25, 960 + 40], [600 - 5, 600 + 20, 600]);
    for (const a of near) expect(Math.abs(a / predicted - 1)).toBeLessThan(0.01);
  });

  it('the brightness factor between two rigs is the ratio the mirror equation predicts for their areas', () => {
    // rig 2 spreads its pixels over less dome (brighter), so against rig 1's area as the reference it
    // is dimmed by A2 / A1, which the paraxial areas predict.
    const a1 = domeAreaOnGrid(new Tracer(paraxialRig(0.3, 1.0, 20, 1.6)), [960], [600])[0];
    const a2 = domeAreaOnGrid(new Tracer(paraxialRig(0.3, 0.5, 20, 1.0)), [960], [600])[0];
    const expected = paraxialArea(0.3, 0.5, 20, 1.0) / paraxialArea(0.3, 1.0, 20, 1.6);
    expect(expected).toBeLessThan(0.9);
    expect(brightnessFactor(a2, a1, { strength: 1, floor: 0 }) / expected).toBeCloseTo(1, 4);
    expect(brightnessFactor(a2, a1, { strength: 0.5, floor: 0 }) / Math.sqrt(expected)).toBeCloseTo(1, 4);
  });
});

/** Bilinear interpolation of the mesh at projector pixel (x, y), independently of the project's own code. */
function meshAt(mesh: WarpMesh, x: number, y: number): [number, number] {
  const gx = (x * (mesh.cols - 1)) / mesh.width;
  const gy = (y * (mesh.rows - 1)) / mesh.height;
  const c = Math.min(mesh.cols - 2, Math.floor(gx));
  const r = Math.min(mesh.rows - 2, Math.floor(gy));
  const fx = gx - c;
  const fy = gy - r;
  const k = r * mesh.cols + c;
  const lerp = (f: Float32Array) =>
    (1 - fy) * ((1 - fx) * f[k] + fx * f[k + 1]) + fy * ((1 - fx) * f[k + mesh.cols] + fx * f[k + mesh.cols + 1]);
  return [lerp(mesh.u), lerp(mesh.v)];
}

/**
 * The interpolation error at (x, y): dome-master pixels, and projector pixels through a Jacobian of the
 * exact trace taken here by central differences with a step (1/8 px) different from the bake's.
 * Null where the point or a neighbour misses the mirror.
 */
function errorAt(t: Tracer, mesh: WarpMesh, x: number, y: number, N: number): { px: number; proj: number } | null {
  const exact = (a: number, b: number) => {
    const h = t.pixel(a, b);
    return h.kind === 'mirror-miss' ? null : h.fisheye;
  };
  const e = exact(x, y);
  const h = 0.125;
  const xm = exact(x - h, y);
  const xp = exact(x + h, y);
  const ym = exact(x, y - h);
  const yp = exact(x, y + h);
  if (!e || !xm || !xp || !ym || !yp) return null;
  const [mu, mv] = meshAt(mesh, x, y);
  const du = (mu - e[0]) * N;
  const dv = (mv - e[1]) * N;
  const a11 = ((xp[0] - xm[0]) / (2 * h)) * N;
  const a21 = ((xp[1] - xm[1]) / (2 * h)) * N;
  const a12 = ((yp[0] - ym[0]) / (2 * h)) * N;
  const a22 = ((yp[1] - ym[1]) / (2 * h)) * N;
  const det = a11 * a22 - a12 * a21;
  return { px: Math.hypot(du, dv), proj: Math.hypot((a22 * du - a12 * dv) / det, (-a21 * du + a11 * dv) / det) };
}

const cellLit = (m: WarpMesh, c: number, r: number) => {
  const k = r * m.cols + c;
  return m.mask[k] >= 0.5 && m.mask[k + 1] >= 0.5 && m.mask[k + m.cols] >= 0.5 && m.mask[k + m.cols + 1] >= 0.5;
};
/** True when every vertex within a few cells is lit: away from the mirror's silhouette and the content edge. */
const interior = (m: WarpMesh, c: number, r: number, reach = 3) => {
  for (let dr = -reach; dr <= reach + 1; dr++)
    for (let dc = -reach; dc <= reach + 1; dc++) {
      const rr = r + dr;
      const cc = c + dc;
      if (rr < 0 || cc < 0 || rr >= m.rows || cc >= m.cols || !(m.mask[rr * m.cols + cc] >= 0.5)) return false;
    }
  return true;
};

describe('the reported interpolation error against an independent dense check', () => {
  const rig = demoRig();
  const tracer = new Tracer(rig);
  const N = BAKE_DEFAULTS.masterSize;

  it('20 random points per lit cell (a grid of 97×61) find the same p99 and max as bakeMesh reports', () => {
    const { mesh, accuracy } = bakeMesh(rig, { grid: [97, 61] });
    const rnd = xorshift(20240611);
    const cw = mesh.width / (mesh.cols - 1);
    const ch = mesh.height / (mesh.rows - 1);
    const cellProj: number[] = [];
    const cellPx: number[] = [];
    const interiorProj: number[] = [];
    for (let r = 0; r < mesh.rows - 1; r++) {
      for (let c = 0; c < mesh.cols - 1; c++) {
        if (!cellLit(mesh, c, r)) continue;
        let proj = -1;
        let px = -1;
        for (let s = 0; s < 20; s++) {
          const e = errorAt(tracer, mesh, (c + rnd()) * cw, (r + rnd()) * ch, N);
          if (!e) continue;
          proj = Math.max(proj, e.proj);
          px = Math.max(px, e.px);
        }
        if (proj < 0) continue;
        cellProj.push(proj);
        cellPx.push(px);
        if (interior(mesh, c, r)) interiorProj.push(proj);
      }
    }
    // Same cells: every cell with four lit vertices.
    expect(cellProj.length).toBe(accuracy.cells);
    const denseP99 = quantile(cellProj, 0.99);
    const denseMax = Math.max(...cellProj);
    const denseP99Px = quantile(cellPx, 0.99);
    const denseMaxPx = Math.max(...cellPx);
    // Random points in a cell find a slightly different worst than a 5×5 lattice; a modest factor.
    expect(denseP99 / accuracy.errorP99Projector).toBeGreaterThan(0.8);
    expect(denseP99 / accuracy.errorP99Projector).toBeLessThan(1.25);
    expect(denseP99Px / accuracy.errorP99Px).toBeGreaterThan(0.8);
    expect(denseP99Px / accuracy.errorP99Px).toBeLessThan(1.25);
    expect(denseMax / accuracy.errorMaxProjector).toBeGreaterThan(0.7);
    expect(denseMax / accuracy.errorMaxProjector).toBeLessThan(1.3);
    expect(denseMaxPx / accuracy.errorMaxPx).toBeGreaterThan(0.7);
    expect(denseMaxPx / accuracy.errorMaxPx).toBeLessThan(1.3);
    // Away from the silhouette the map is smooth and nothing hides between the lattice points: the
    // dense worst there stays below the reported worst (which sits at the edge, as reported).
    expect(Math.max(...interiorProj)).toBeLessThanOrEqual(accuracy.errorMaxProjector);
    expect(accuracy.worstNearEdge).toBe(true);
  });

  it('halving the cell size cuts the error about fourfold away from the edge (bilinear error ∝ h², any numerical analysis text)', () => {
    const grids: [number, number][] = [
      [49, 31],
      [97, 61],
      [193, 121],
    ];
    const meshes = grids.map((g) => bakeMesh(rig, { grid: g }));
    // Fixed random points in the interior of the coarsest mesh, the same points for every grid.
    const coarse = meshes[0].mesh;
    const rnd = xorshift(7);
    const pts: [number, number][] = [];
    while (pts.length < 1500) {
      const x = rnd() * coarse.width;
      const y = rnd() * coarse.height;
      const c = Math.floor((x * (coarse.cols - 1)) / coarse.width);
      const r = Math.floor((y * (coarse.rows - 1)) / coarse.height);
      if (interior(coarse, c, r, 2)) pts.push([x, y]);
    }
    const stats = meshes.map(({ mesh }) => {
      const e = pts.map(([x, y]) => errorAt(tracer, mesh, x, y, N)!.px);
      return { median: quantile(e, 0.5), p90: quantile(e, 0.9) };
    });
    for (let i = 1; i < stats.length; i++) {
      const ratioMedian = stats[i - 1].median / stats[i].median;
      const ratioP90 = stats[i - 1].p90 / stats[i].p90;
      expect(ratioMedian).toBeGreaterThan(3);
      expect(ratioMedian).toBeLessThan(5.5);
      expect(ratioP90).toBeGreaterThan(3);
      expect(ratioP90).toBeLessThan(5.5);
    }
    // and the reported figures fall with the grid too (slower: the silhouette's cells dominate them)
    for (let i = 1; i < meshes.length; i++) {
      expect(meshes[i].accuracy.errorP99Projector).toBeLessThan(meshes[i - 1].accuracy.errorP99Projector / 2);
    }
  });
});

describe('the error of what a GPU draws: the .glb\'s triangles, not bilinear quads', () => {
  // glTF 2.0 has triangles only (Sec. 3.7.2.1, primitive modes); the .glb splits each cell (tl, bl, br),
  // (tl, br, tr) (packages/warp-cli/src/export/glb.ts), and a GPU interpolates each triangle affinely
  // (OpenGL ES 3.0, Sec. 3.6.1, barycentric interpolation). bake measures bilinear quads. Where the
  // two differ the tolerance promised for the file may not hold for the file as played.
  it('the grid bake chooses keeps the triangles within the tolerance over 99% of lit cells', () => {
    const rig = demoRig();
    const { mesh, accuracy, options } = bakeMesh(rig);
    const tracer = new Tracer(rig);
    const N = options.masterSize;
    const k = 4; // points per cell side, at (a + 0.5)/k
    const { cols, rows, width: W, height: H } = mesh;
    const cw = W / (cols - 1);
    const ch = H / (rows - 1);
    const sx = Float64Array.from({ length: (cols - 1) * k }, (_, i) => (Math.floor(i / k) + ((i % k) + 0.5) / k) * cw);
    const sy = Float64Array.from({ length: (rows - 1) * k }, (_, j) => (Math.floor(j / k) + ((j % k) + 0.5) / k) * ch);
    const h = 0.125;
    const at = (dx: number, dy: number) => tracer.grid(sx.map((x) => x + dx), sy.map((y) => y + dy), allocGridOutput(sx.length, sy.length));
    const g = at(0, 0);
    const [xm, xp, ym, yp] = [at(-h, 0), at(h, 0), at(0, -h), at(0, h)];
    const tri: number[] = [];
    const quad: number[] = [];
    for (let r = 0; r < rows - 1; r++)
      for (let c = 0; c < cols - 1; c++) {
        if (!cellLit(mesh, c, r)) continue;
        const k00 = r * cols + c;
        const k10 = k00 + 1;
        const k01 = k00 + cols;
        const k11 = k01 + 1;
        let eTri = -1;
        let eQuad = -1;
        for (let b = 0; b < k; b++)
          for (let a = 0; a < k; a++) {
            const i = (r * k + b) * sx.length + c * k + a;
            if ([g, xm, xp, ym, yp].some((o) => o.kind[i] === 0)) continue;
            const fx = (a + 0.5) / k;
            const fy = (b + 0.5) / k;
            const triangle = (f: Float32Array) =>
              fy >= fx ? f[k00] + fy * (f[k01] - f[k00]) + fx * (f[k11] - f[k01]) : f[k00] + fx * (f[k10] - f[k00]) + fy * (f[k11] - f[k10]);
            const bilinear = (f: Float32Array) => (1 - fy) * ((1 - fx) * f[k00] + fx * f[k10]) + fy * ((1 - fx) * f[k01] + fx * f[k11]);
            const a11 = ((xp.u[i] - xm.u[i]) / (2 * h)) * N;
            const a21 = ((xp.v[i] - xm.v[i]) / (2 * h)) * N;
            const a12 = ((yp.u[i] - ym.u[i]) / (2 * h)) * N;
            const a22 = ((yp.v[i] - ym.v[i]) / (2 * h)) * N;
            const det = a11 * a22 - a12 * a21;
            const proj = (du: number, dv: number) => Math.hypot((a22 * du - a12 * dv) / det, (-a21 * du + a11 * dv) / det);
            eTri = Math.max(eTri, proj((triangle(mesh.u) - g.u[i]) * N, (triangle(mesh.v) - g.v[i]) * N));
            eQuad = Math.max(eQuad, proj((bilinear(mesh.u) - g.u[i]) * N, (bilinear(mesh.v) - g.v[i]) * N));
          }
        if (eTri >= 0) {
          tri.push(eTri);
          quad.push(eQuad);
        }
      }
    const triP99 = quantile(tri, 0.99);
    const quadP99 = quantile(quad, 0.99);
    // the bilinear figure is what bake reports (checked above); the triangles are what players draw
    expect(quadP99 / accuracy.errorP99Projector).toBeGreaterThan(0.8);
    expect(quadP99 / accuracy.errorP99Projector).toBeLessThan(1.25);
    expect(triP99, `triangles p99 ${triP99.toFixed(3)} px vs bilinear ${quadP99.toFixed(3)} px, grid ${cols}x${rows}`).toBeLessThanOrEqual(options.tolerance);
  });
});

describe('brightness factor and mask (DESIGN.md "Brightness")', () => {
  it('b = (A / A_max)^s clipped to [floor, 1]; 1 at the reference; strength 0 gives 1 everywhere', () => {
    const o = { strength: 1, floor: 0.1 };
    expect(brightnessFactor(2.5e-5, 2.5e-5, o)).toBe(1);
    expect(brightnessFactor(1e-5, 4e-5, o)).toBeCloseTo(0.25, 12);
    expect(brightnessFactor(1e-5, 4e-5, { strength: 0.5, floor: 0.1 })).toBeCloseTo(0.5, 12);
    expect(brightnessFactor(1e-7, 4e-5, o)).toBe(0.1); // floor
    expect(brightnessFactor(9e-5, 4e-5, o)).toBe(1); // larger patches than the reference are not brightened
    for (const a of [1e-9, 1e-5, 4e-5, 1]) expect(brightnessFactor(a, 4e-5, { strength: 0, floor: 0.1 })).toBe(1);
  });

  it('on the demo mesh: lit vertices in [floor, 1], tracking A / A_max vertex by vertex; strength 0 → all 1', () => {
    const rig = demoRig();
    const floor = 0.25;
    const { mesh, areaMax, brightnessMin, brightnessMax } = bakeMesh(rig, { grid: [97, 61], brightnessFloor: floor });
    const lit = [...mesh.brightness].filter((_, k) => mesh.mask[k] >= 0.5);
    for (const b of lit) {
      expect(b).toBeGreaterThanOrEqual(floor - 1e-7);
      expect(b).toBeLessThanOrEqual(1);
    }
    expect(brightnessMin).toBeCloseTo(Math.min(...lit), 6);
    expect(brightnessMax).toBe(1);
    // b = 1 exactly where the area reaches the reference, and the factor tracks A / A_max elsewhere.
    const t = new Tracer(rig);
    const xs = Float64Array.from({ length: mesh.cols }, (_, i) => (i * mesh.width) / (mesh.cols - 1));
    const ys = Float64Array.from({ length: mesh.rows }, (_, j) => (j * mesh.height) / (mesh.rows - 1));
    const area = domeAreaOnGrid(t, xs, ys);
    let checked = 0;
    for (let k = 0; k < area.length; k++) {
      if (!(mesh.mask[k] >= 0.5) || !Number.isFinite(area[k])) continue;
      const expected = Math.min(1, Math.max(floor, area[k] / areaMax));
      expect(mesh.brightness[k]).toBeCloseTo(expected, 5);
      checked++;
    }
    expect(checked).toBeGreaterThan(1000);
    const off = bakeMesh(rig, { grid: [97, 61], brightness: 0 });
    for (let k = 0; k < off.mesh.brightness.length; k++) if (off.mesh.mask[k] >= 0.5) expect(off.mesh.brightness[k]).toBe(1);
    expect(off.brightnessMin).toBe(1);
  });

  it('A_max is a high percentile of the lit area: a single stray patch does not set it', () => {
    const t = new Tracer(demoRig());
    const ref = referenceArea(t);
    // The same sampling as the reference: every 4 px over the frame.
    const xs = Float64Array.from({ length: 480 }, (_, i) => i * 4 + 2);
    const ys = Float64Array.from({ length: 300 }, (_, j) => j * 4 + 2);
    const g = t.grid(xs, ys, allocGridOutput(xs.length, ys.length));
    const area = domeAreaOnGrid(t, xs, ys);
    const used: number[] = [];
    for (let k = 0; k < area.length; k++) {
      const inside = g.kind[k] !== 0 && (g.u[k] - 0.5) ** 2 + (g.v[k] - 0.5) ** 2 <= 0.25;
      if (inside && Number.isFinite(area[k])) used.push(area[k]);
    }
    const max = Math.max(...used);
    expect(max).toBeGreaterThan(ref);
    // A high percentile of the lit samples: between the 98th and the 99.5th of our own count.
    expect(ref).toBeGreaterThanOrEqual(quantile(used, 0.98));
    expect(ref).toBeLessThanOrEqual(quantile(used, 0.995));
    const above = used.filter((a) => a > ref).length / used.length;
    expect(above).toBeGreaterThan(0.003);
    expect(above).toBeLessThan(0.03);
    // One stray value among thousands leaves the percentile where it was.
    const stray = [...used, 1e6 * max];
    expect(quantile(stray, 0.99) / quantile(used, 0.99)).toBeLessThan(1.001);
  });

  it('mask below 0.5 for mirror misses and beyond the content fov, 0.5 or more inside; 0 and 1 away from the edge (no feather)', () => {
    const rig = demoRig({ content: { fov: 150 } });
    const { mesh } = bakeMesh(rig, { grid: [65, 41] });
    const t = new Tracer(rig);
    const lit = (c: number, r: number) => {
      const h = t.pixel((c * mesh.width) / (mesh.cols - 1), (r * mesh.height) / (mesh.rows - 1));
      return h.kind !== 'mirror-miss' && Math.hypot(h.fisheye[0] - 0.5, h.fisheye[1] - 0.5) <= 0.5;
    };
    // two cells from every vertex of the other state: beyond the ramp's half-width (a cell diagonal)
    const farFromEdge = (c: number, r: number) => {
      for (let dr = -2; dr <= 2; dr++)
        for (let dc = -2; dc <= 2; dc++) {
          const cc = c + dc;
          const rr = r + dr;
          if (cc >= 0 && rr >= 0 && cc < mesh.cols && rr < mesh.rows && lit(cc, rr) !== lit(c, r)) return false;
        }
      return true;
    };
    const counts = { miss: 0, beyond: 0, lit: 0 };
    for (let r = 0; r < mesh.rows; r++) {
      for (let c = 0; c < mesh.cols; c++) {
        const k = r * mesh.cols + c;
        const h = t.pixel((c * mesh.width) / (mesh.cols - 1), (r * mesh.height) / (mesh.rows - 1));
        const far = farFromEdge(c, r);
        if (h.kind === 'mirror-miss') {
          counts.miss++;
          expect(mesh.mask[k]).toBeLessThan(0.5);
          if (far) expect(mesh.mask[k]).toBe(0);
        } else if (Math.hypot(h.fisheye[0] - 0.5, h.fisheye[1] - 0.5) > 0.5 + 1e-9) {
          counts.beyond++;
          expect(mesh.mask[k]).toBeLessThan(0.5);
          if (far) expect(mesh.mask[k]).toBe(0);
        } else if (Math.hypot(h.fisheye[0] - 0.5, h.fisheye[1] - 0.5) < 0.5 - 1e-6) {
          counts.lit++;
          expect(mesh.mask[k]).toBeGreaterThanOrEqual(0.5);
          if (far) expect(mesh.mask[k]).toBe(1);
        }
        // every vertex keeps finite (u, v) so a GPU never samples junk
        expect(Number.isFinite(mesh.u[k]) && Number.isFinite(mesh.v[k])).toBe(true);
      }
    }
    expect(counts.miss).toBeGreaterThan(100);
    expect(counts.beyond).toBeGreaterThan(20);
    expect(counts.lit).toBeGreaterThan(500);
  });

  it('feather: the same ramp, wider — lit and unlit sides kept, values rising monotonely toward the inside', () => {
    const rig = demoRig();
    const hard = bakeMesh(rig, { grid: [129, 81] }).mesh;
    const soft = bakeMesh(rig, { grid: [129, 81], feather: 12 }).mesh; // about 60 px each side, three cell diagonals
    let partialHard = 0;
    let partialSoft = 0;
    for (let k = 0; k < soft.mask.length; k++) {
      expect(soft.mask[k]).toBeGreaterThanOrEqual(0);
      expect(soft.mask[k]).toBeLessThanOrEqual(1);
      // the 0.5 level stays on the edge: a wider ramp dims the inside and lights the outside more
      expect(soft.mask[k] >= 0.5).toBe(hard.mask[k] >= 0.5);
      if (hard.mask[k] >= 0.5) expect(soft.mask[k]).toBeLessThanOrEqual(hard.mask[k] + 1e-6);
      else expect(soft.mask[k]).toBeGreaterThanOrEqual(hard.mask[k] - 1e-6);
      if (hard.mask[k] > 0 && hard.mask[k] < 1) partialHard++;
      if (soft.mask[k] > 0 && soft.mask[k] < 1) partialSoft++;
    }
    expect(partialSoft).toBeGreaterThan(1.5 * partialHard);
    // Along the middle row and the middle column: from each end of the run the ramp touches inward,
    // the mask never falls (to float rounding) and reaches 1 in the middle.
    const runs: number[][] = [];
    const midRow = Math.round(soft.rows / 2);
    runs.push(Array.from({ length: soft.cols }, (_, c) => midRow * soft.cols + c));
    let sumC = 0;
    let nC = 0;
    for (let k = 0; k < hard.mask.length; k++) if (hard.mask[k] >= 0.5) ((sumC += k % hard.cols), nC++);
    const midCol = Math.round(sumC / nC);
    runs.push(Array.from({ length: soft.rows }, (_, r) => r * soft.cols + midCol));
    for (const line of runs) {
      const litIdx = line.filter((k) => soft.mask[k] > 0);
      expect(litIdx.length).toBeGreaterThan(10);
      const vals = litIdx.map((k) => soft.mask[k]);
      const peak = vals.indexOf(Math.max(...vals));
      expect(vals[peak]).toBe(1);
      expect(vals[0]).toBeLessThan(0.5);
      expect(vals[vals.length - 1]).toBeLessThan(1);
      for (let i = 1; i <= peak; i++) expect(vals[i]).toBeGreaterThanOrEqual(vals[i - 1] - 1e-6);
      for (let i = vals.length - 2; i >= peak; i--) expect(vals[i]).toBeGreaterThanOrEqual(vals[i + 1] - 1e-6);
    }
  });
});
