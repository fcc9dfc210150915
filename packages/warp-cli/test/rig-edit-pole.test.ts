/**
 * fit and plan writing back a rig whose mirror was placed by its pole (the apex a tape reaches), or
 * given by a cap deeper than a hemisphere: the document keeps the form the user wrote.
 */
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { mirrorPole, rigFromDocument, type Rig } from '@skyfold/warp-core';
import { editedRigText } from '../src/io/rig-edit.js';

function edit(text: string, change: (r: Rig) => void): { out: string; after: Rig; back: Rig } {
  const before = rigFromDocument(parse(text));
  const after = structuredClone(before);
  change(after);
  const out = editedRigText(text, before, after);
  return { out, after, back: rigFromDocument(parse(out)) };
}

const POLE = `units: cm
dome: {radius: 250}
mirror:
  cap: {width: 50, depth: 26}   # a deep security dome
  pole: [0, -170, 30]   # taped to the apex
  axis: [0, 1, 1]
projector:
  position: [0, -60, 10]
  lookAt: [0, -190, 20]
  resolution: [1280, 800]
  throwRatio: 1.5
`;

describe('a mirror placed by its pole', () => {
  it('a moved mirror writes its pole back, never a centre', () => {
    const { out, after, back } = edit(POLE, (r) => (r.mirror.center[2] += 0.02));
    expect(out).not.toMatch(/center/);
    expect(out).toMatch(/^ {2}pole: \[0, -170, 32\] +# taped to the apex$/m);
    expect(back.mirror.center[2]).toBeCloseTo(after.mirror.center[2], 9);
  });

  it('a new radius moves the pole and keeps the deep cap deep', () => {
    const { out, after, back } = edit(POLE, (r) => (r.mirror.radius += 0.01));
    expect(back.mirror.radius).toBeCloseTo(after.mirror.radius, 7);
    // the centre stays where the fit put it, so the pole moves out along the axis by the same centimetre
    for (let i = 0; i < 3; i++) expect(mirrorPole(back.mirror)[i]).toBeCloseTo(mirrorPole(after.mirror)[i], 7);
    expect(back.mirror.capAngle).toBeGreaterThan(Math.PI / 2);
    // the deep root of the sagitta relation: depth = r + √(r² − (w/2)²), r in cm
    const r = after.mirror.radius * 100;
    const depth = Number((r + Math.sqrt(r * r - 25 * 25)).toFixed(6));
    expect(depth).toBeGreaterThan(26);
    expect(out).toContain(`cap: {width: 50, depth: ${depth}}`);
  });
});
