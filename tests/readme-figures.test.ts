/**
 * The figures the README quotes from the demo cannot go stale: each is read from the README and
 * compared with what skyfold prints for the demo rig today. When one fails, run the command in the
 * message and copy its figure into README.md.
 */
import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { DEMO_MEASUREMENTS, DEMO_RIG, ROOT, skyfold, tempDir } from './support.js';

const README = readFileSync(join(ROOT, 'README.md'), 'utf8').replace(/\s+/g, ' ');
const dir = tempDir('skyfold-readme-');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The groups of the README's one sentence matching `re`, failing with the sentence's pattern if it is gone. */
function quoted(re: RegExp): string[] {
  const m = re.exec(README);
  expect(m, `README.md no longer has a sentence matching ${re}`).not.toBeNull();
  return m!.slice(1);
}

describe('the README figures are the demo output', () => {
  it('bake: the grid, the p99 error and the share over the tolerance, as `skyfold bake` prints them', async () => {
    const r = await skyfold(['bake', DEMO_RIG, '-o', join(dir, 'demo.glb')]);
    expect(r.code, r.stderr).toBe(0);
    const out = r.stdout.replace(/\s+/g, ' ');
    const [cols, rows, p99, p99t, over, overT] = quoted(/On the demo rig: a (\d+) × (\d+) grid, p99 ([\d.]+) projector px \(([\d.]+) as the triangles a GPU draws\), ([\d.]+)% of lit cells over the tolerance \(([\d.]+)% as triangles\)/);
    const says = `skyfold bake fixtures/demo-rig.yaml prints: ${r.stdout}`;
    expect(out, says).toContain(`grid ${cols} x ${rows} vertices`);
    expect(out, says).toContain(`error, p99 ${p99} projector px`);
    expect(out, says).toContain(`as triangles p99 ${p99t},`);
    expect(out, says).toContain(`${over}% of lit cells exceed it (${overT}% as triangles)`);
  });

  it('fit: the misfit lines of the example session, as `skyfold fit` prints them', async () => {
    const r = await skyfold(['fit', DEMO_RIG, DEMO_MEASUREMENTS]);
    expect(r.code, r.stderr).toBe(0);
    const [before, after] = quoted(/(misfit before: rms [^`]*? rms) (misfit after: {1,2}rms [^`]*? rms)/);
    const says = `skyfold fit fixtures/demo-rig.yaml fixtures/demo-measurements.yaml prints: ${r.stdout}`;
    const out = r.stdout.replace(/\s+/g, ' ');
    expect(out, says).toContain(before);
    expect(out, says).toContain(after);
  });
});
