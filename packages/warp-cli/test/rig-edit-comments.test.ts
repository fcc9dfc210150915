/**
 * Issue 15: a rig edited by `fit` or `plan` keeps its trailing comments where the user put them, also
 * when a value gets longer: a column of aligned comments moves as one and stays a column.
 */
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { rigFromDocument, type Rig } from '@skyfold/warp-core';
import { editedRigText } from '../src/io/rig-edit.js';

function edit(text: string, change: (r: Rig) => void): { out: string; after: Rig; back: Rig } {
  const before = rigFromDocument(parse(text));
  const after = structuredClone(before);
  change(after);
  const out = editedRigText(text, before, after);
  return { out, after, back: rigFromDocument(parse(out)) };
}

/** Column of the trailing comment on the line that starts with `start` (after its indentation). */
function columnOf(text: string, start: string): number {
  const line = text.split('\n').find((l) => l.trimStart().startsWith(start));
  if (!line) throw new Error(`no line starting ${start}`);
  return line.indexOf(' #') + 1;
}

const RIG = `name: "dome #2"        # a hash inside quotes is no comment
units: m

dome:
  radius: 2.5          # nominal
  floor: 0.5           # below the springline

mirror:
  radius: 0.3     # the safety mirror
  center: [0, -1.95, 0.15]   # on a stand
  axis: [0, 1, 1]            # toward the front
  capAngle: 90               # hemisphere

projector:
  position:
    - 0        # x
    - -0.75    # y, toward the back
    - 0.1      # z, above the springline
  lookAt: [0, -1.95, 0.25]
  resolution: [1920, 1200]
  throwRatio: 1.6
`;

describe('trailing comments after an edit', () => {
  it('a value that grows past an aligned column moves the whole column, and it stays one column', () => {
    const { out, back, after } = edit(RIG, (r) => (r.mirror.center = [0.0123456, -1.9512345, 0.1501234]));
    const center = out.split('\n').find((l) => l.startsWith('  center:'))!;
    expect(center).toMatch(/^ {2}center: \[0\.012346, -1\.951234, 0\.150123\] {3}# on a stand$/);
    const column = columnOf(out, 'center:');
    expect(column).toBeGreaterThan(columnOf(RIG, 'center:'));
    // axis and capAngle were aligned with center in the user's file: they follow it
    expect(columnOf(out, 'axis:')).toBe(column);
    expect(columnOf(out, 'capAngle:')).toBe(column);
    // the mirror's radius had a column of its own, and the dome's block is untouched
    expect(columnOf(out, 'radius: 0.3')).toBe(columnOf(RIG, 'radius: 0.3'));
    for (const key of ['radius: 2.5', 'floor:', 'name:']) expect(out).toContain(RIG.split('\n').find((l) => l.trimStart().startsWith(key))!);
    back.mirror.center.forEach((c, i) => expect(Math.abs(c - after.mirror.center[i])).toBeLessThanOrEqual(5.0001e-7)); // six decimals written
  });

  it('a shorter value keeps the comment at its column; keys of the same name in two sections keep their own', () => {
    const { out } = edit(RIG, (r) => ((r.mirror.radius = 0.25), (r.dome.radius = 2.75)));
    expect(out).toMatch(/^ {2}radius: 0\.25 {4}# the safety mirror$/m);
    expect(out).toMatch(/^ {2}radius: 2\.75 {9}# nominal$/m);
    expect(columnOf(out, 'radius: 0.25')).toBe(columnOf(RIG, 'radius: 0.3'));
    expect(columnOf(out, 'radius: 2.75')).toBe(columnOf(RIG, 'radius: 2.5'));
  });

  it('items of a block list with comments: the aligned comments move together when one item grows', () => {
    const { out, back, after } = edit(RIG, (r) => (r.projector.position[1] = -0.7512345));
    const items = out.split('\n').filter((l) => l.startsWith('    - '));
    expect(items).toHaveLength(3);
    expect(items[1]).toMatch(/^ {4}- -0\.751235 +# y, toward the back$/);
    const columns = items.map((l) => l.indexOf('#'));
    expect(new Set(columns).size).toBe(1);
    expect(columns[0]).toBeGreaterThan(RIG.split('\n').find((l) => l.startsWith('    - -0.75'))!.indexOf('#'));
    expect(Math.abs(back.projector.position[1] - after.projector.position[1])).toBeLessThanOrEqual(5.0001e-7);
  });

  it('an edit that changes nothing gives the user text back as it was', () => {
    expect(edit(RIG, () => {}).out).toBe(RIG);
  });
});
