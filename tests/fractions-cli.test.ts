// `--fractions` (issue 12): output in feet and inches to the nearest sixteenth of an inch instead of
// decimals, on a rig in feet (the school's mesh dome) and on the geodesic build sheet; metric rigs and
// --json are unchanged.
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseLengthString } from '@skyfold/warp-core';
import { DEMO_RIG, FIXTURES, skyfold, tempDir } from './support.js';

const SCHOOL = join(FIXTURES, 'school-dome-rig.yaml');
const dir = tempDir('fractions');
const IN = 0.0254;

/** The dome point column of probe's table, one row: three lengths as printed. */
function domePoint(stdout: string): string[] {
  const row = stdout.trim().split('\n')[2];
  return row.slice(row.lastIndexOf('  ') + 2).split(', ');
}

describe('--fractions', () => {
  it('probe on the school dome: each coordinate in sixteenths, within half a sixteenth of the decimal output', async () => {
    const decimal = await skyfold(['probe', SCHOOL, '--pixel', '960,300']);
    const tape = await skyfold(['probe', SCHOOL, '--pixel', '960,300', '--fractions']);
    expect(tape.code).toBe(0);
    const a = domePoint(decimal.stdout);
    const b = domePoint(tape.stdout);
    expect(a.some((t) => /\d\.\d/.test(t))).toBe(true);
    expect(b.some((t) => /\d+\/\d+ in$/.test(t))).toBe(true);
    for (const t of b) expect(t).toMatch(/^-?(\d+ ft )?(\d+ in|\d+ \d+\/(2|4|8|16) in|\d+\/(2|4|8|16) in)$/);
    // decimal output is to a hundredth of an inch, so the two agree to 1/32 + 1/200 in
    for (let i = 0; i < 3; i++) expect(Math.abs(parseLengthString(b[i]) - parseLengthString(a[i])) / IN).toBeLessThanOrEqual(1 / 32 + 0.005 + 1e-9);
  });

  it('is a program option: before the command as well as after it', async () => {
    const after = await skyfold(['probe', SCHOOL, '--pixel', '960,300', '--fractions']);
    const before = await skyfold(['--fractions', 'probe', SCHOOL, '--pixel', '960,300']);
    expect(before.code).toBe(0);
    expect(before.stdout).toBe(after.stdout);
  });

  it('the geodesic build sheet gives strut lengths a builder can mark: 3V, 16 ft across', async () => {
    const r = await skyfold(['geodesic', join(dir, 'g.obj'), '--frequency', '3', '--diameter', '16 ft', '--units', 'ft', '--fractions']);
    expect(r.code).toBe(0);
    // chord factor × radius, the factors Kenner's (Geodesic Math and How to Use It, 1976): 0.34862 × 96 in = 33.47 in
    expect(r.stdout).toMatch(/^A +0\.34862 +2 ft 9 7\/16 in +30$/m);
    expect(r.stdout).toMatch(/^B +0\.40355 +3 ft 2 3\/4 in +50$/m);
    expect(r.stdout).toMatch(/^C +0\.41241 +3 ft 3 9\/16 in +70$/m);
  });

  it('leaves a metric rig and --json alone', async () => {
    const plain = await skyfold(['probe', DEMO_RIG, '--pixel', '960,300']);
    const frac = await skyfold(['probe', DEMO_RIG, '--pixel', '960,300', '--fractions']);
    expect(frac.stdout).toBe(plain.stdout);
    const j1 = await skyfold(['probe', SCHOOL, '--pixel', '960,300', '--json']);
    const j2 = await skyfold(['probe', SCHOOL, '--pixel', '960,300', '--json', '--fractions']);
    expect(j2.stdout).toBe(j1.stdout);
  });

  it('report words its summary lengths in sixteenths on a rig in feet', async () => {
    const r = await skyfold(['report', SCHOOL, '--fractions', '-o', join(dir, 'report'), '--rays', '4000']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/\d+\/(2|4|8|16) in/);
    expect(r.stdout).not.toMatch(/\d+\.\d+ in/);
  });
});
