/**
 * The map `warp` builds from each mesh format bake writes (issue 11), against the one it builds from
 * the .glb: one bake of the 320 × 200 golden rig, each file read back by its own reader, the maps
 * compared pixel by pixel within what each format can hold (the bounds are stated beside each check).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable, Writable } from 'node:stream';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Tracer, type RemapMap } from '@skyfold/warp-core';
import { run } from '../src/main.js';
import { loadRig } from '../src/io/document-file.js';
import { loadMapSource, type MapSource } from '../src/warp/map-source.js';

const ROOT = fileURLToPath(new URL('../../..', import.meta.url));
const RIG = join(ROOT, 'fixtures', 'golden', 'warp-rig-320x200.yaml');
const S = 4096; // dome-master pixels, as the bake reports them
const FORMATS = ['glb', 'obj', 'pfm', 'mpcdi', 'png', 'csv'] as const;

describe('the map warp builds from each mesh format', () => {
  const dir = mkdtempSync(join(tmpdir(), 'skyfold-mesh-formats-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const maps: Record<string, RemapMap> = {};
  const sources: Record<string, MapSource> = {};

  beforeAll(async () => {
    let stderr = '';
    const sink = (keep: boolean) => new Writable({ write: (c: Buffer, _e, done) => (keep && (stderr += String(c)), done()) });
    const code = await run(['bake', RIG, ...FORMATS.flatMap((f) => ['-o', join(dir, `m.${f}`)])], { stdin: Readable.from([]), stdout: sink(false), stderr: sink(true), env: { ...process.env, CI: 'true' } });
    expect(code, stderr).toBe(0);
    for (const f of FORMATS) {
      sources[f] = await loadMapSource(join(dir, `m.${f}`), undefined, f === 'pfm' || f === 'png' ? { projectorSize: [320, 200] } : {});
      maps[f] = sources[f].build([S, S], {});
    }
  }, 60_000);

  const n = 320 * 200;

  it('.csv: every value the same as the .glb (float32 written in full); .obj the same but v, which it holds as t = 1 − v', () => {
    const g = maps.glb;
    expect(Array.from(maps.csv.x)).toEqual(Array.from(g.x));
    expect(Array.from(maps.csv.y)).toEqual(Array.from(g.y));
    expect(Array.from(maps.csv.gain)).toEqual(Array.from(g.gain));
    expect(Array.from(maps.obj.x)).toEqual(Array.from(g.x));
    expect(Array.from(maps.obj.gain)).toEqual(Array.from(g.gain));
    // OBJ's texture origin is the bottom left: t = 1 − v rounded to float32 and back moves v by at most
    // one float32 step at 1 (2^-24), interpolated: 2^-24·S dome-master pixels
    let worst = 0;
    for (let k = 0; k < n; k++) if (g.gain[k] > 0) worst = Math.max(worst, Math.abs(maps.obj.y[k] - g.y[k]));
    expect(worst).toBeLessThanOrEqual(2 ** -24 * S * 1.01);
  });

  it('.png: content within 0.5/65535 of the frame, the light factor within 2/65535, where the cell holds no clamped value', () => {
    // each of u, v, brightness, mask rounded to 1/65535 (half a step at most); interpolation keeps the
    // bound for u, v; gain = m·b moves by at most δm + δb. A vertex whose (u, v) lies outside the
    // fisheye square (below the horizon, carried by an unlit vertex) was clamped to [0, 1] on writing
    // (the format cannot hold it): pixels in such cells are only counted, and they are few, at the rim
    const g = maps.glb;
    const p = maps.png;
    const mesh = sources.glb.mesh!;
    const { cols, rows } = mesh;
    const inSquare = (q: number) => mesh.u[q] >= 0 && mesh.u[q] <= 1 && mesh.v[q] >= 0 && mesh.v[q] <= 1;
    const step = 0.5 / 65535;
    let clamped = 0;
    let lit = 0;
    let worstXY = 0;
    let worstGain = 0;
    for (let j = 0; j < 200; j++)
      for (let i = 0; i < 320; i++) {
        const k = j * 320 + i;
        if (!(g.gain[k] > 0)) continue;
        lit++;
        const c = Math.min(cols - 2, Math.floor(((i + 0.5) * (cols - 1)) / 320));
        const r = Math.min(rows - 2, Math.floor(((j + 0.5) * (rows - 1)) / 200));
        if (![r * cols + c, r * cols + c + 1, (r + 1) * cols + c, (r + 1) * cols + c + 1].every(inSquare)) {
          clamped++;
          continue;
        }
        worstXY = Math.max(worstXY, Math.abs(p.x[k] - g.x[k]), Math.abs(p.y[k] - g.y[k]));
        worstGain = Math.max(worstGain, Math.abs(p.gain[k] - g.gain[k]));
      }
    expect(worstXY).toBeLessThanOrEqual(step * S * 1.0001 + 1e-3);
    expect(worstGain).toBeLessThanOrEqual(4 * step);
    expect(clamped / lit).toBeLessThan(0.03); // 1.6% on this rig, whose coarse grid puts many cells across the rim
  });

  it('.pfm: content the same as the .glb; the light factor brightness·mask interpolated as one, within the bound that sets', () => {
    // a player interpolates the product; the .glb's map multiplies the interpolated brightness and mask.
    // Over one triangle with weights w: Σw·b·m − (Σw·b)(Σw·m) is a weighted covariance, at most
    // range(b)·range(m)/4 (Popoviciu's inequality on variances with Cauchy–Schwarz); within float32 rounding
    const g = maps.glb;
    const p = maps.pfm;
    const mesh = sources.glb.mesh!;
    const { cols, rows } = mesh;
    let worstXY = 0;
    let beyond = 0;
    let interiorOff = 0;
    for (let j = 0; j < 200; j++)
      for (let i = 0; i < 320; i++) {
        const k = j * 320 + i;
        if (g.gain[k] > 0 || p.gain[k] > 0) {
          expect(g.gain[k] > 0, `pixel ${i},${j}`).toBe(p.gain[k] > 0);
          worstXY = Math.max(worstXY, Math.abs(p.x[k] - g.x[k]), Math.abs(p.y[k] - g.y[k]));
        }
        const c = Math.min(cols - 2, Math.floor(((i + 0.5) * (cols - 1)) / 320));
        const r = Math.min(rows - 2, Math.floor(((j + 0.5) * (rows - 1)) / 200));
        const ks = [r * cols + c, r * cols + c + 1, (r + 1) * cols + c, (r + 1) * cols + c + 1];
        const bs = ks.map((q) => mesh.brightness[q]);
        const ms = ks.map((q) => mesh.mask[q]);
        const bound = ((Math.max(...bs) - Math.min(...bs)) * (Math.max(...ms) - Math.min(...ms))) / 4 + 1e-6;
        const d = Math.abs(p.gain[k] - g.gain[k]);
        if (d > bound) beyond++;
        if (Math.min(...ms) === 1 && d > 1e-6) interiorOff++;
      }
    expect(worstXY).toBe(0);
    expect(beyond).toBe(0);
    expect(interiorOff).toBe(0);
  });

  it('.mpcdi: its fill-layout grid sampled as a texture puts content as near the exact trace as the .glb does', () => {
    // the warp grid is traced at the sample centres (VESA MPCDI 2.0 §3.6), not at the .glb's vertices:
    // both interpolate the same trace, so each is held to the exact trace, not to the other
    const tracer = new Tracer(loadRig(RIG).rig);
    const t = tracer.frameGrid({});
    const errs = (m: RemapMap) => {
      const e: number[] = [];
      for (let k = 0; k < n; k++) if (maps.glb.gain[k] > 0.5 && m.gain[k] > 0) e.push(Math.hypot(m.x[k] - t.u[k] * S, m.y[k] - t.v[k] * S));
      return e.sort((a, b) => a - b);
    };
    const q = (e: number[], p: number) => e[Math.min(e.length - 1, Math.floor(p * e.length))];
    const eg = errs(maps.glb);
    const em = errs(maps.mpcdi);
    expect(em.length).toBeGreaterThan(0.98 * eg.length);
    expect(q(em, 0.5)).toBeLessThanOrEqual(Math.max(2 * q(eg, 0.5), 0.05));
    expect(q(em, 0.99)).toBeLessThanOrEqual(2 * q(eg, 0.99));
    // the alpha map: 8-bit (half a step, 0.5/255), bilinear over the grid where the .glb's map takes two
    // triangles; in cells whose mask is 1 all round both interpolate the brightness, and they differ by
    // at most a quarter of the cell's twist |b00 − b10 − b01 + b11| (fx·(1 − fy) ≤ 1/4 on either triangle)
    const mesh = sources.glb.mesh!;
    const { cols, rows } = mesh;
    let interior = 0;
    let off = 0;
    for (let j = 0; j < 200; j++)
      for (let i = 0; i < 320; i++) {
        const k = j * 320 + i;
        const c = Math.min(cols - 2, Math.floor(((i + 0.5) * (cols - 1)) / 320));
        const r = Math.min(rows - 2, Math.floor(((j + 0.5) * (rows - 1)) / 200));
        const ks = [r * cols + c, r * cols + c + 1, (r + 1) * cols + c, (r + 1) * cols + c + 1];
        if (!ks.every((q) => mesh.mask[q] === 1)) continue;
        interior++;
        const [b00, b10, b01, b11] = ks.map((q) => mesh.brightness[q]);
        if (Math.abs(maps.mpcdi.gain[k] - maps.glb.gain[k]) > 0.5 / 255 + Math.abs(b00 - b10 - b01 + b11) / 4 + 1e-6) off++;
      }
    expect(interior).toBeGreaterThan(10_000);
    expect(off).toBe(0);
  });
});
