/**
 * The `skyfold` program in a temporary folder, run in-process on captured streams as a user would type it
 * (DESIGN.md "Commands": --json output, exit 0 / 2, one-line errors naming file and field, no stack traces).
 */
import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse as parseYaml } from 'yaml';
import { RAD, rigFromDocument, Tracer, type Rig } from '@skyfold/warp-core';
import { FIXTURES, skyfold as runSkyfold, tempDir, type Run } from './support.js';

const dir = tempDir('cli');

function skyfold(...args: string[]): Promise<Run> {
  return runSkyfold(args, { cwd: dir });
}

function write(name: string, text: string): string {
  writeFileSync(join(dir, name), text);
  return name;
}

function vectors(name: 'a' | 'b' | 'c'): { rig: Record<string, any>; results: any[] } {
  return JSON.parse(readFileSync(join(FIXTURES, 'vectors', `vectors-${name}.json`), 'utf8'));
}

function loadYamlRig(name: string): Rig {
  return rigFromDocument(parseYaml(readFileSync(join(dir, name), 'utf8')));
}

/** Exit 2 and exactly one line on stderr, no stack trace; returns that line. */
function expectUserError(r: Run): string {
  expect(r.code, `stdout: ${r.stdout}\nstderr: ${r.stderr}`).toBe(2);
  const lines = r.stderr.trimEnd().split('\n');
  expect(lines, r.stderr).toHaveLength(1);
  expect(r.stderr).not.toMatch(/^\s{4}at /m);
  expect(r.stderr).not.toMatch(/internal error/);
  return lines[0];
}

/** The rig of vectors-a as a YAML file with one change. */
function vectorsAYaml(name: string, edit: (rig: Record<string, any>) => void): string {
  const rig = structuredClone(vectors('a').rig);
  edit(rig);
  return write(name, JSON.stringify(rig, null, 2)); // JSON is YAML
}

describe('skyfold', () => {
  it('--help lists the commands and exits 0', async () => {
    const r = await skyfold('--help');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^Usage: skyfold/);
    for (const c of ['init', 'probe', 'locate']) expect(r.stdout).toContain(c);
  });

  it('init -o rig.yaml, then probe --json prints exactly the documented shape and agrees with the library', async () => {
    const init = await skyfold('init', '-o', 'rig.yaml');
    expect(init.code).toBe(0);
    expect(existsSync(join(dir, 'rig.yaml'))).toBe(true);
    const r = await skyfold('probe', 'rig.yaml', '--pixel', '960,600', '--pixel', '0.5,0.5', '--pixel', '700.25,820.75', '--json');
    expect(r.code, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    // exactly one JSON line, keys in the documented order
    expect(r.stdout.trimEnd().split('\n')).toHaveLength(1);
    expect(Object.keys(out)).toEqual(['results']);
    expect(out.results).toHaveLength(3);
    const t = new Tracer(loadYamlRig('rig.yaml'));
    let lit = 0;
    for (const res of out.results) {
      const [x, y] = res.pixel;
      const h = t.pixel(x, y);
      expect(res.hit).toBe(h.kind);
      if (h.kind === 'mirror-miss') {
        expect(Object.keys(res)).toEqual(['pixel', 'hit']);
        continue;
      }
      lit++;
      expect(Object.keys(res)).toEqual(['pixel', 'hit', 'fisheye', 'azimuth', 'altitude', 'domePoint']);
      expect(res.fisheye).toHaveLength(2);
      expect(res.domePoint).toHaveLength(3);
      // the same code on both sides: equal to the last bit, up to JSON's shortest round-trip printing
      expect(res.fisheye).toEqual(h.fisheye);
      expect(res.azimuth).toBe(h.azimuth * RAD);
      expect(res.altitude).toBe(h.altitude * RAD);
      expect(res.domePoint).toEqual(h.domePoint);
    }
    expect(lit).toBe(2);
    expect(out.results[1]).toEqual({ pixel: [0.5, 0.5], hit: 'mirror-miss' });
  });

  for (const name of ['a', 'b', 'c'] as const) {
    it(`probe on fixtures/vectors/vectors-${name} (rig written out as JSON) gives the vector answers`, async () => {
      const v = vectors(name);
      // vectors-c names its dome mesh relative to its own folder: the mesh goes beside the rig
      if (typeof v.rig.dome.mesh === 'string') write(v.rig.dome.mesh, readFileSync(join(FIXTURES, 'vectors', v.rig.dome.mesh), 'utf8'));
      const file = write(`vectors-${name}.json`, JSON.stringify(v.rig));
      const r = await skyfold('probe', file, '--json', ...v.results.flatMap((res) => ['--pixel', `${res.pixel[0]},${res.pixel[1]}`]));
      expect(r.code, r.stderr).toBe(0);
      const out = JSON.parse(r.stdout);
      expect(out.results).toHaveLength(v.results.length);
      v.results.forEach((want, i) => {
        const got = out.results[i];
        expect(got.pixel).toEqual(want.pixel);
        expect(got.hit).toBe(want.hit);
        // the same fields (vectors-c lists the pixel last, probe first)
        expect(Object.keys(got).sort()).toEqual(Object.keys(want).sort());
        if (want.hit === 'mirror-miss' || want.hit === 'open') return;
        const close = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-6);
        close(got.fisheye[0], want.fisheye[0]);
        close(got.fisheye[1], want.fisheye[1]);
        close(got.azimuth, want.azimuth);
        close(got.altitude, want.altitude);
        want.domePoint.forEach((c: number, k: number) => close(got.domePoint[k], c));
      });
    });
  }

  it('locate --json: a pixel, or pixel null with a reason', async () => {
    const file = write('a.json', JSON.stringify(vectors('a').rig));
    const r = await skyfold('locate', file, '--direction', '0,90', '--direction', '180,5', '--json');
    expect(r.code, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(Object.keys(out)).toEqual(['results']);
    const [zenith, behind] = out.results;
    expect(Object.keys(zenith)).toEqual(['azimuth', 'altitude', 'pixel']);
    expect(zenith.azimuth).toBe(0);
    expect(zenith.altitude).toBe(90);
    expect(zenith.pixel).toHaveLength(2);
    // and that pixel lights the zenith (traced in-process, the same code as probe)
    const back = new Tracer(rigFromDocument(vectors('a').rig)).pixel(zenith.pixel[0], zenith.pixel[1]);
    if (back.kind === 'mirror-miss') throw new Error('locate returned an unlit pixel');
    expect(back.altitude * RAD).toBeCloseTo(90, 6);
    expect(back.fisheye[0]).toBeCloseTo(0.5, 8);
    expect(back.fisheye[1]).toBeCloseTo(0.5, 8);
    expect(behind).toEqual({ azimuth: 180, altitude: 5, pixel: null, reason: expect.any(String) });
    expect(Object.keys(behind)).toEqual(['azimuth', 'altitude', 'pixel', 'reason']);
    expect(behind.reason).toMatch(/reflected view/);
  });

  it('init --units ft writes the same rig, within the 0.01 in rounding of its lengths', async () => {
    expect((await skyfold('init', '--units', 'ft', '-o', 'rig-ft.yaml')).code).toBe(0);
    if (!existsSync(join(dir, 'rig.yaml'))) expect((await skyfold('init', '-o', 'rig.yaml')).code).toBe(0);
    const text = readFileSync(join(dir, 'rig-ft.yaml'), 'utf8');
    expect(text).toMatch(/^units: ft$/m);
    expect(text).toMatch(/ ft [\d.]+ in"/);
    const m = loadYamlRig('rig.yaml');
    const f = loadYamlRig('rig-ft.yaml');
    expect(f.units).toBe('ft');
    const tol = 0.005 * 0.0254 + 1e-12; // half of 0.01 in, the printed precision
    const near = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThanOrEqual(tol);
    near(f.dome.radius, m.dome.radius); // a diameter, halved: half the error
    near(f.dome.floor!, m.dome.floor!);
    near(f.mirror.radius, m.mirror.radius);
    f.mirror.center.forEach((c, i) => near(c, m.mirror.center[i]));
    f.projector.position.forEach((c, i) => near(c, m.projector.position[i]));
    f.projector.lookAt.forEach((c, i) => near(c, m.projector.lookAt[i]));
    expect(f.mirror.axis).toEqual(m.mirror.axis);
    expect(f.mirror.capAngle).toBe(m.mirror.capAngle);
    expect(f.projector.resolution).toEqual(m.projector.resolution);
    expect(f.projector.throwRatio).toBe(m.projector.throwRatio);
    expect(f.content).toEqual(m.content);
  });

  it('init -o refuses to overwrite without --force', async () => {
    write('keep.yaml', 'mine\n');
    const line = expectUserError(await skyfold('init', '-o', 'keep.yaml'));
    expect(line).toBe('skyfold: keep.yaml: already exists; pass --force to overwrite it');
    expect(readFileSync(join(dir, 'keep.yaml'), 'utf8')).toBe('mine\n');
    expect((await skyfold('init', '-o', 'keep.yaml', '--force')).code).toBe(0);
    expect(readFileSync(join(dir, 'keep.yaml'), 'utf8')).toMatch(/^# skyfold rig file/);
  });
});

describe('bad input: exit 2, one line naming file and field, no stack trace', () => {
  it('a negative radius string', async () => {
    const f = vectorsAYaml('neg.yaml', (r) => (r.mirror.radius = '-3 in'));
    expect(expectUserError(await skyfold('probe', f, '--pixel', '1,1'))).toBe('skyfold: neg.yaml: mirror.radius: expected a positive length, got "-3 in"');
  });

  it('an unknown field, with did-you-mean', async () => {
    const f = vectorsAYaml('typo.yaml', (r) => {
      r.projector.throwRaito = r.projector.throwRatio;
      delete r.projector.throwRatio;
    });
    expect(expectUserError(await skyfold('probe', f, '--pixel', '1,1'))).toBe('skyfold: typo.yaml: projector.throwRaito: unknown field; did you mean "throwRatio"?');
  });

  it('an unknown unit', async () => {
    const f = vectorsAYaml('unit.yaml', (r) => (r.dome.radius = '2 yd'));
    expect(expectUserError(await skyfold('locate', f, '--direction', '0,90'))).toBe(
      'skyfold: unit.yaml: dome.radius: unknown unit "yd" in "2 yd" (expected one of m, cm, mm, ft, in)',
    );
  });

  it('a geometry refusal (the projector outside the dome)', async () => {
    const f = vectorsAYaml('outside.yaml', (r) => (r.projector.position = [0, 2.5, 0.15]));
    expect(expectUserError(await skyfold('probe', f, '--pixel', '1,1'))).toBe(
      'skyfold: outside.yaml: projector.position: the projector is outside the dome (2.504 m from the centre; the dome radius is 2 m)',
    );
  });

  it('a JSON syntax error in a .json rig names the file (and line and column where JSON.parse gives a position)', async () => {
    const f = write('broken.json', '{\n "dome": {\n  "radius": 2,\n }\n}\n');
    const line = expectUserError(await skyfold('probe', f, '--pixel', '1,1'));
    expect(line).toMatch(/^skyfold: broken\.json: line 4, column 2: JSON syntax error: /);
  });

  it('a missing file', async () => {
    expect(expectUserError(await skyfold('probe', 'nowhere.yaml', '--pixel', '1,1'))).toBe('skyfold: nowhere.yaml: cannot read the rig file: no such file');
  });

  it('a bad --pixel value names the option and what was expected', async () => {
    if (!existsSync(join(dir, 'rig.yaml'))) await skyfold('init', '-o', 'rig.yaml');
    const line = expectUserError(await skyfold('probe', 'rig.yaml', '--pixel', '960'));
    expect(line).toContain('--pixel');
    expect(line).toContain('expected X,Y (two numbers), got "960"');
  });

  it('a YAML syntax error gives "line N, column M"', async () => {
    const f = write('broken.yaml', 'dome:\n  radius: [1\nmirror: {}\n');
    const line = expectUserError(await skyfold('probe', f, '--pixel', '1,1'));
    expect(line).toMatch(/^skyfold: broken\.yaml: /);
    expect(line).toContain('YAML syntax error');
    expect(line).toMatch(/line \d+, column \d+/);
  });
});
