/**
 * Issue 10: a bake over a grid of more cells than a JavaScript call takes arguments must not end in
 * "Maximum call stack size exceeded" (no spread of large arrays), and its figures stay finite.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { bakeMesh } from '../src/mesh/bake.js';
import { rigFromDocument } from '../src/rig/document.js';

const DEMO_RIG = fileURLToPath(new URL('../../../fixtures/demo-rig.yaml', import.meta.url));

describe('bake over a large grid', () => {
  it('measures 300 000 cells (more than the ~125 000 arguments a spread may pass) without a stack overflow', () => {
    const rig = rigFromDocument(parse(readFileSync(DEMO_RIG, 'utf8')));
    // one sample per cell keeps the trace small; the cell count is what used to overflow
    const r = bakeMesh(rig, { grid: [900, 560], samplesPerCell: 1 });
    expect(r.accuracy.cells).toBeGreaterThan(200_000);
    expect(Number.isFinite(r.accuracy.errorMaxProjector)).toBe(true);
    expect(r.accuracy.errorMaxProjector).toBeGreaterThanOrEqual(r.accuracy.errorP99Projector);
  });
});
