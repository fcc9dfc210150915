/**
 * `fit` and `plan` write the user's own rig document back with only the changed values changed:
 * comments, order and layout kept, each value in the form the user wrote it.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { fitRig, measurementsFromDocument, rigFromDocument, type Rig } from '@skyfold/warp-core';
import { fittedRigText } from '../src/commands/fit.js';
import { editedRigText } from '../src/io/rig-edit.js';

const fixture = (name: string) => fileURLToPath(new URL(`../../../fixtures/${name}`, import.meta.url));
const IN = 0.0254;

/** Edits `text` from its rig to the rig `change` makes of a copy, and reads the result back. */
function edit(text: string, change: (r: Rig) => void): { out: string; before: Rig; after: Rig; back: Rig } {
  const before = rigFromDocument(parse(text));
  const after = structuredClone(before);
  change(after);
  const out = editedRigText(text, before, after);
  return { out, before, after, back: rigFromDocument(parse(out)) };
}

const FEET = `# my dome, measured with a tape
name: "barn dome"
units: ft

dome:
  diameter: "16 ft 4 in"   # across the springline
  floor: "1 ft 8 in"

mirror:
  cap: {width: "24 in", depth: "6 in"}   # the acrylic safety mirror
  center: ["0 in", "-6 ft 5 in", "6 in"]  # on the stool
  axis: [0, 2, 2]

projector:
  position: [0, -2.5, "4 in"]   # bare numbers are feet
  lookAt: ["0 in", "-6 ft 5 in", "10 in"]
  resolution: [1280, 800]
  throwRatio: 1.6
`;

describe('editing the user rig document', () => {
  it('keeps a diameter a diameter and a "16 ft 4 in" string a string in feet and inches', () => {
    const { out, back } = edit(FEET, (r) => (r.dome.radius += 1 * IN));
    expect(out).toMatch(/^ {2}diameter: "16 ft 6 in" +# across the springline$/m);
    expect(out).not.toMatch(/radius/);
    expect(back.dome.radius).toBeCloseTo((16 * 12 + 6) * IN / 2, 9);
  });

  it('changes only the changed values: every other line is as the user wrote it', () => {
    const { out, back, after } = edit(FEET, (r) => (r.projector.position[1] -= 3 * IN));
    const a = FEET.split('\n');
    const b = out.split('\n');
    expect(b.length).toBe(a.length);
    const changed = a.map((l, i) => (l === b[i] ? null : [l, b[i]])).filter((x) => x !== null);
    // -2.5 ft - 3 in = -2.75 ft: the bare number stays a bare number in feet; the other two untouched
    expect(changed).toEqual([['  position: [0, -2.5, "4 in"]   # bare numbers are feet', '  position: [0, -2.75, "4 in"]  # bare numbers are feet']]);
    expect(back.projector.position[1]).toBeCloseTo(after.projector.position[1], 9);
  });

  it('keeps the mirror a cap of the measured width, its depth from the sagitta relation', () => {
    const { out, after } = edit(FEET, (r) => (r.mirror.radius *= 1.1));
    // r = (s² + (w/2)²) / (2s), the sagitta relation the rig reader uses (docs/design.md, mirror model), solved for s
    const r = after.mirror.radius;
    const depth = r - Math.sqrt(r * r - (12 * IN) ** 2);
    expect(out).toMatch(new RegExp(`cap: \\{ ?width: "24 in", depth: "${Number((depth / IN).toFixed(2))} in" ?\\} +# the acrylic safety mirror`));
    expect(out).not.toMatch(/^ {2}radius/m);
  });

  it('writes a new mirror axis with the size the user gave the old one', () => {
    const { out, back, after } = edit(FEET, (r) => (r.mirror.axis = [0, 0.6, 0.8]));
    expect(out).toMatch(/^ {2}axis: \[0, 1\.5, 2\]$/m);
    back.mirror.axis.forEach((c, i) => expect(c).toBeCloseTo(after.mirror.axis[i], 6));
  });

  it('adds a value the document did not give, in the document units', () => {
    const { out, back } = edit(FEET, (r) => (r.projector.roll = (180 * Math.PI) / 180));
    expect(out).toMatch(/^ {2}roll: 180$/m);
    expect(back.projector.roll).toBeCloseTo(Math.PI, 9);
  });
});

describe('skyfold fit writes into the user rig file', () => {
  it('keeps every comment of the demo rig and writes the fitted values in its form', () => {
    const rigText = readFileSync(fixture('demo-rig-ft.yaml'), 'utf8');
    const rig = rigFromDocument(parse(rigText));
    const set = measurementsFromDocument(parse(readFileSync(fixture('demo-measurements.yaml'), 'utf8')));
    const result = fitRig(rig, set, {});
    const out = fittedRigText(result, rig, rigText, 'rig.yaml', 'm.yaml', set.units);
    for (const c of rigText.split('\n').filter((l) => l.includes('#'))) expect(out).toContain(c.slice(c.indexOf('#')));
    expect(out).toMatch(/^ {2}diameter: "16 ft 4\.85 in" +# or radius:$/m);
    // the fitted centre stays three strings in feet and inches, with the fit's note above it
    expect(out).toMatch(/\n {2}# fitted, ± \[[\d.]+ in, [\d.]+ in, [\d.]+ in\]; was \[0 in, -6 ft 4\.77 in, 5\.91 in\]\n {2}center: \["-?[\d.]+ in", "-6 ft [\d.]+ in", "[\d.]+ in"\]/);
    const back = rigFromDocument(parse(out));
    back.mirror.center.forEach((c, i) => expect(Math.abs(c - result.rig.mirror.center[i])).toBeLessThan(0.006 * IN)); // 0.01 in printed
  });
});

describe('a rig read from a .glb', () => {
  it('has no text of its own: fit and plan write the rig afresh', async () => {
    const { rigDocumentText } = await import('../src/io/rig-edit.js');
    const rig = rigFromDocument(parse(FEET));
    const back = rigFromDocument(parse(rigDocumentText('baked.glb', rig)));
    expect(back.dome.radius).toBeCloseTo(rig.dome.radius, 6);
    back.projector.position.forEach((c, i) => expect(c).toBeCloseTo(rig.projector.position[i], 6));
  });
});
