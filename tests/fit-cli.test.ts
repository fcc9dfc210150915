/**
 * `skyfold fit` and `skyfold pattern` as a user runs them: in-process on temporary files (as
 * glTF-Transform's packages/cli/test/cli.test.ts does), plus one end-to-end run of the real binary.
 * The example session in fixtures/demo-measurements.yaml was made from a "true" rig written in its
 * header; the fit must find that rig again.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeEach, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { parse } from 'yaml';
import { angleBetween, DEG, RAD, rigFromDocument, Tracer, type Rig } from '@skyfold/warp-core';
import { DEMO_MEASUREMENTS, DEMO_RIG, skyfold, spawnSkyfold, tempDir } from './support.js';

const RIG = DEMO_RIG;
const MEASUREMENTS = DEMO_MEASUREMENTS;
const dir = tempDir('fit');

let stdout = '';
let stderr = '';
beforeEach(() => {
  stdout = '';
  stderr = '';
});

/** Runs skyfold in-process; its output is added to `stdout` and `stderr`. */
async function run(...args: string[]): Promise<number | null> {
  const r = await skyfold(args);
  stdout += r.stdout;
  stderr += r.stderr;
  return r.code;
}
const tmp = (name: string) => join(dir, name);
const loadRigFile = (path: string): Rig => rigFromDocument(parse(readFileSync(path, 'utf8')));

/** The "true" rig the example measurements were generated from (fixtures/demo-measurements.yaml, header). */
function trueRig(): Rig {
  const t = loadRigFile(RIG);
  t.mirror.center = [0.021, -1.982, 0.168];
  t.projector.position = [-0.012, -0.732, 0.088];
  t.projector.lookAt = [0.03, -1.95, 0.28];
  t.projector.roll = 1.1 * DEG;
  t.projector.throwRatio = 1.62;
  return t;
}

/** Median and 95th-percentile angle (degrees) between where two rigs send the pixels of a grid. */
function landing(truth: Rig, rig: Rig): [number, number] {
  const a = new Tracer(truth);
  const b = new Tracer(rig);
  const e: number[] = [];
  for (let y = 20; y < 1200; y += 40) {
    for (let x = 20; x < 1920; x += 40) {
      const ha = a.pixel(x, y);
      const hb = b.pixel(x, y);
      if (ha.kind === 'dome' && hb.kind !== 'mirror-miss') e.push(angleBetween(ha.direction, hb.direction) * RAD);
    }
  }
  e.sort((p, q) => p - q);
  return [e[Math.floor(e.length / 2)], e[Math.floor(0.95 * e.length)]];
}

describe('skyfold fit', () => {
  it('fits the example session: a much better rig, residuals, standard errors, a commented rig file', async () => {
    const out = tmp('fitted.yaml');
    expect(await run('fit', RIG, MEASUREMENTS, '-o', out, '--json')).toBe(0);
    const j = JSON.parse(stdout);
    expect(j.rmsBefore).toBeGreaterThan(10);
    expect(j.rms).toBeLessThan(1.5);
    expect(j.units).toBe('m');
    expect(j.equations).toBe(35);
    expect(j.unknowns).toBe(10);
    expect(j.residuals).toHaveLength(23);
    expect(j.residuals[0]).toMatchObject({ item: 'measurements[0]', kind: 'distance', label: 'mirror.pole - rim@0' });
    expect(j.residuals[11]).toMatchObject({ item: 'observations[0]', kind: 'observation', pixel: [978, 494] });
    expect(j.warnings).toEqual([]);
    const truth = trueRig();
    // every fitted coordinate within four standard errors of the truth (3σ honesty, with a margin for a single run)
    const centre = j.parameters['mirror.center'];
    centre.value.forEach((v: number, i: number) => expect(Math.abs(v - truth.mirror.center[i])).toBeLessThan(4 * centre.stderr[i]));
    const roll = j.parameters['projector.roll'];
    expect(roll.unit).toBe('deg');
    expect(Math.abs(roll.value - 1.1)).toBeLessThan(4 * roll.stderr);
    expect(j.parameters['projector.lookAt'].aimStderr).toHaveLength(2);

    const text = readFileSync(out, 'utf8');
    expect(text).toMatch(/^# Fitted by `skyfold fit` from .*demo-rig\.yaml and .*demo-measurements\.yaml\./);
    expect(text).toContain('# Solved: mirror.center, projector.position, projector.lookAt, projector.roll, projector.throwRatio;');
    expect(text).toMatch(/\n {2}# fitted, ± \[[\d.]+ mm, [\d.]+ mm, [\d.]+ mm\]; was \[0 m, -1\.95 m, 0\.15 m\]\n {2}center: \[[^\]]+\] +# near the back wall, on a stand\n/);
    const fitted = loadRigFile(out);
    const [medBefore, p95Before] = landing(truth, loadRigFile(RIG));
    const [medAfter, p95After] = landing(truth, fitted);
    expect(medBefore).toBeGreaterThan(2);
    expect(medAfter).toBeLessThan(0.2);
    expect(p95After).toBeLessThan(p95Before / 5);
  });

  it('prints a readable report', async () => {
    expect(await run('fit', RIG, MEASUREMENTS)).toBe(0);
    expect(stdout).toMatch(/^fit: 11 distances and 12 observations = 35 equations for 10 unknowns \(mirror\.center, /);
    expect(stdout).toMatch(/\nmisfit after: {2}rms 0\.\d\d sigma, distances 0\.00\d+ m rms, observations 0\.\d+° rms\n/);
    expect(stdout).toMatch(/\nmeasurements\[0\] +mirror\.pole - rim@0 +4\.291 m /);
    expect(stdout).toMatch(/\nobservations\[0\] +pixel 978,494 at zenith +zenith +zenith +0\.\d+° /);
    expect(stdout).toMatch(/\nprojector\.roll +0\.000° +1\.\d+° +0\.\d+°\n/);
    expect(stdout).toMatch(/\nworst: \w+\[\d+\] \(.+\), \d\.\d\d sigma\n/);
    expect(stderr).toBe('');
  });

  it('never overwrites a file unless asked, the input rig included', async () => {
    const out = tmp('exists.yaml');
    writeFileSync(out, 'keep me');
    expect(await run('fit', RIG, MEASUREMENTS, '-o', out)).toBe(2);
    expect(stderr).toBe(`skyfold: ${out}: already exists; pass --force to overwrite it\n`);
    expect(readFileSync(out, 'utf8')).toBe('keep me');
    stderr = '';
    const rigCopy = tmp('rig-copy.yaml');
    writeFileSync(rigCopy, readFileSync(RIG));
    expect(await run('fit', rigCopy, MEASUREMENTS, '-o', rigCopy)).toBe(2);
    expect(stderr).toBe(`skyfold: ${rigCopy}: already exists (it is the input rig); pass --force to overwrite it\n`);
    expect(await run('fit', rigCopy, MEASUREMENTS, '-o', rigCopy, '--force')).toBe(0);
    expect(readFileSync(rigCopy, 'utf8')).toMatch(/^# Fitted by/);
  });

  it('bad input: one line naming the file and the field, exit 2', async () => {
    const m = tmp('bad.yaml');
    writeFileSync(m, 'measurements:\n  - {between: [mirror.pole, rim@0], distance: -3}\nfree: [mirror.center]\n');
    expect(await run('fit', RIG, m)).toBe(2);
    expect(stderr).toBe(`skyfold: ${m}: measurements[0].distance: expected a positive length, got -3\n`);

    stderr = '';
    const few = tmp('few.yaml');
    writeFileSync(few, 'observations:\n  - {pixel: [960, 300], azimuth: 180, altitude: 47}\nfree: [mirror.center]\n');
    expect(await run('fit', RIG, few)).toBe(2);
    expect(stderr).toBe(`skyfold: ${few}: free: fewer equations than unknowns: expected at least 3 equations for mirror.center (3), got 2 (0 distances, 1 observations × 2)\n`);

    stderr = '';
    expect(await run('fit', RIG, MEASUREMENTS, '--free', 'mirror.centre')).toBe(2);
    expect(stderr).toMatch(/^skyfold: --free: expected one of mirror\.center, .*, got "mirror\.centre"; did you mean "mirror\.center"\?\n$/);

    stderr = '';
    expect(await run('fit', RIG, tmp('missing.yaml'))).toBe(2);
    expect(stderr).toBe(`skyfold: ${tmp('missing.yaml')}: cannot read the measurement file: no such file\n`);
  });

  it('--robust names the bad reading; --free replaces the file list; degenerate sets are named', async () => {
    const m = tmp('one-bad.yaml');
    writeFileSync(m, readFileSync(MEASUREMENTS, 'utf8').replace('distance: 3.069', 'distance: 3.169'));
    expect(await run('fit', RIG, m, '--robust', '--json')).toBe(0);
    const j = JSON.parse(stdout);
    expect(j.warnings.some((w: string) => w.startsWith('measurements[1] (mirror.pole - rim@90) disagrees with the rest'))).toBe(true);
    expect(j.residuals[1].weight).toBeLessThan(0.2);

    stdout = '';
    const line = tmp('line.yaml');
    const obs = [430, 560, 690, 820, 950, 1080, 1210]
      .map((x) => {
        const h = new Tracer(loadRigFile(RIG)).pixel(x, 600);
        if (h.kind === 'mirror-miss') throw new Error('expected a hit');
        return `  - {pixel: [${x}, 600], azimuth: ${(h.azimuth * RAD).toFixed(3)}, altitude: ${(h.altitude * RAD).toFixed(3)}}`;
      })
      .join('\n');
    writeFileSync(line, `observations:\n${obs}\n`);
    expect(await run('fit', RIG, line, '--free', 'projector.lookAt,projector.lensShift', '--json')).toBe(0);
    const k = JSON.parse(stdout);
    expect(k.degeneracies[0]).toMatchObject({ severity: 'undetermined', inflation: null });
    expect(k.degeneracies[0].quantities.sort()).toEqual(['projector.lensShift', 'projector.lookAt']);
    expect(k.warnings.some((w: string) => /^projector\.\w+ and projector\.\w+ cannot be told apart with these measurements and points/.test(w))).toBe(true);
    expect(k.parameters['projector.lensShift'].stderr[1]).toBeNull();
  });

  it('runs as a user runs it (the real binary)', async () => {
    const r = await spawnSkyfold(['fit', RIG, MEASUREMENTS]).done;
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('misfit after:');
    expect(r.stderr).toBe('');
  });

  it('a rig given as the measurement file is refused by its first unknown field', async () => {
    expect(await run('fit', RIG, RIG)).toBe(2);
    expect(stderr).toBe(`skyfold: ${RIG}: dome: unknown field (known here: units, name, notes, measurements, observations, free)\n`);
  });
});

describe('skyfold pattern', () => {
  it('dome: a dome master of the chosen size', async () => {
    const out = tmp('grid.png');
    expect(await run('pattern', 'dome', '-o', out, '--size', '512', '--rings', '15', '--spokes', '45', '--dot', '0,30', '--json')).toBe(0);
    expect(JSON.parse(stdout)).toEqual({ file: out, width: 512, height: 512, warped: false, fov: 180 });
    const meta = await sharp(out).metadata();
    expect([meta.width, meta.height, meta.channels, meta.format]).toEqual([512, 512, 3, 'png']);
  });

  it('dome --warp: projector-sized, black where the mirror is missed, lit where the dome is', async () => {
    // the demo rig at a quarter of its resolution keeps the per-pixel trace quick
    const rig = tmp('small-rig.yaml');
    writeFileSync(rig, readFileSync(RIG, 'utf8').replace('resolution: [1920, 1200]', 'resolution: [480, 300]'));
    const out = tmp('warped.png');
    expect(await run('pattern', 'dome', '--warp', rig, '-o', out, '--size', '512', '--filter', 'bilinear')).toBe(0);
    expect(stdout).toBe(`wrote ${out} (480 × 300, warped for ${rig})\n`);
    const { data, info } = await sharp(out).raw().toBuffer({ resolveWithObject: true });
    expect([info.width, info.height]).toEqual([480, 300]);
    const px = (x: number, y: number) => [0, 1, 2].map((c) => data[(y * info.width + x) * info.channels + c]);
    expect(px(2, 2)).toEqual([0, 0, 0]); // misses the mirror
    let litCount = 0;
    for (let y = 75; y < 200; y++) for (let x = 150; x < 325; x++) if (px(x, y).some((c) => c > 0)) litCount++;
    expect(litCount).toBeGreaterThan(100);
  });

  it('markers: one frame per marker with --each, and a measurement-file template', async () => {
    const out = tmp('marker.png');
    expect(await run('pattern', 'markers', '--rig', RIG, '--markers', '960,300', '1280,400', '--at', 'zenith', '--each', '-o', out)).toBe(0);
    for (const n of ['01', '02', '03']) expect(existsSync(tmp(`marker-${n}.png`))).toBe(true);
    expect(stdout).toMatch(/^wrote .*marker-01\.png, .*marker-02\.png, .*marker-03\.png \(1920 × 1200, 3 markers\)\n/);
    expect(stdout).toContain('\nobservations:\n  - {pixel: [960, 300], azimuth: ');
    expect(stdout).toMatch(/ {2}- \{pixel: \[[\d.]+, [\d.]+\], azimuth: [\d.]+, altitude: 90\.0\} {3}# marker 3 \(placed for zenith\)\n/);
    // the template is a valid measurement file once the header lines are gone
    const template = stdout.slice(stdout.indexOf('observations:'));
    expect(parse(template).observations).toHaveLength(3);

    stdout = '';
    expect(await run('pattern', 'markers', '--resolution', '640x400', '--markers', '320,200', '-o', tmp('one.png'), '--json')).toBe(0);
    expect(JSON.parse(stdout)).toEqual({ files: [tmp('one.png')], width: 640, height: 400, markers: [{ number: 1, pixel: [320, 200], from: 'pixel', predicted: null }] });
    const meta = await sharp(tmp('one.png')).metadata();
    expect([meta.width, meta.height]).toEqual([640, 400]);
  });

  it('markers: bad input is one line and exit 2', async () => {
    expect(await run('pattern', 'markers', '--markers', '10,10', '-o', tmp('x.png'))).toBe(2);
    expect(stderr).toBe('skyfold: pattern markers: expected --rig or --resolution to know the frame size, got neither\n');
    stderr = '';
    expect(await run('pattern', 'markers', '--resolution', '640x400', '--markers', '700,10', '-o', tmp('x.png'))).toBe(2);
    expect(stderr).toBe('skyfold: --markers: expected a pixel inside the 640 × 400 frame, got 700,10\n');
    stderr = '';
    expect(await run('pattern', 'dome', '-o', tmp('x.jpg'))).toBe(2);
    expect(stderr).toBe(`skyfold: ${tmp('x.jpg')}: expected a .png output file, got ".jpg"\n`);
  });
});
