/**
 * domeAreaOnGrid traces in bands of rows to bound its memory: every value must be the one a trace of
 * that row alone gives (each grid point's trace is independent of the others), bit for bit, across
 * band boundaries and a short last band.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { domeAreaOnGrid } from '../src/mesh/grid-samples.js';
import { rigFromDocument } from '../src/rig/document.js';
import { Tracer } from '../src/trace.js';

const rig = rigFromDocument(parse(readFileSync(new URL('../../../fixtures/demo-rig.yaml', import.meta.url), 'utf8')));

describe('domeAreaOnGrid in bands', () => {
  it('gives each row the values of that row traced alone', () => {
    const tracer = new Tracer(rig);
    const [W, H] = rig.projector.resolution;
    const xs = Float64Array.from({ length: 48 }, (_, i) => (i + 0.5) * (W / 48));
    // 75 rows: two full bands of 32 and a short one, spread over the frame so some miss the mirror
    const ys = Float64Array.from({ length: 75 }, (_, j) => (j + 0.5) * (H / 75));
    const all = domeAreaOnGrid(tracer, xs, ys);
    let lit = 0;
    for (let j = 0; j < ys.length; j++) {
      const row = domeAreaOnGrid(tracer, xs, [ys[j]]);
      for (let i = 0; i < xs.length; i++) {
        expect(Object.is(all[j * xs.length + i], row[i])).toBe(true);
        if (Number.isFinite(row[i])) lit++;
      }
    }
    // the check means something only if many points land on the dome and some do not
    expect(lit).toBeGreaterThan(xs.length * ys.length * 0.2);
    expect(lit).toBeLessThan(xs.length * ys.length);
  });
});
