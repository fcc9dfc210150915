/**
 * `skyfold geodesic`: the OBJ it writes and the build sheet it prints, against the handbook (Kenner,
 * *Geodesic Math and How to Use It*, 1976: chord factors and triangle kinds for radius 1), in process.
 */
import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseTriangleFile } from '@skyfold/warp-core';
import { FIXTURES, skyfold, tempDir } from './support.js';

const dir = tempDir('geodesic');
const at = (name: string) => join(dir, name);

async function sheet(...args: string[]) {
  const r = await skyfold(['geodesic', ...args, '--json']);
  expect(r.code, r.stderr).toBe(0);
  return JSON.parse(r.stdout);
}

describe('skyfold geodesic', () => {
  it('3V 5/8 of radius 1: Kenner\'s three chord factors, AAB and BCC triangles, 105 faces of the OBJ', async () => {
    const s = await sheet(at('3v.obj'), '--frequency', '3', '--radius', '1', '--truncation', '5/8');
    // Kenner 1976, 3V chord factors (class I, method 1): A 0.34862, B 0.40355, C 0.41241
    expect(s.struts.map((x: any) => Number(x.chordFactor.toFixed(5)))).toEqual([0.34862, 0.40355, 0.41241]);
    // Kenner 1976: the 3V triangles are two A sides and a B, and a B and two C sides
    expect(s.triangles.map((t: any) => t.sides)).toEqual(['AAB', 'BCC']);
    // the 5/8 dome of a 3V sphere: 105 triangles, 165 struts, 61 hubs (V − E + F = 1 for a dome with one opening)
    expect(s.sphereTriangles).toBe(105);
    expect(s.struts.reduce((a: number, x: any) => a + x.count, 0)).toBe(165);
    expect(s.hubs).toBe(61);
    const soup = parseTriangleFile(readFileSync(at('3v.obj')), '3v.obj');
    expect(soup.indices.length / 3).toBe(105);
  });

  it('2V and 4V hemispheres: the handbook\'s chord factors (Kenner 1976), 40 and 160 faces', async () => {
    const two = await sheet(at('2v.obj'), '--frequency', '2', '--radius', '1');
    expect(two.struts.map((x: any) => Number(x.chordFactor.toFixed(5)))).toEqual([0.54653, 0.61803]);
    expect(two.sphereTriangles).toBe(40);
    const four = await sheet(at('4v.obj'), '--frequency', '4', '--radius', '1');
    // Kenner 1976, 4V: six lengths from 0.25318 to 0.32492
    expect(four.struts.map((x: any) => Number(x.chordFactor.toFixed(5)))).toEqual([0.25318, 0.29453, 0.29524, 0.29859, 0.31287, 0.32492]);
    expect(four.sphereTriangles).toBe(160);
    expect(Math.abs(four.baseHeight)).toBeLessThan(1e-12);
  });

  it('feet and inches: a 16 ft diameter 4V on a 2 ft 6 in skirt, the OBJ in feet, strut lengths in feet', async () => {
    const s = await sheet(at('school.obj'), '--frequency', '4', '--diameter', '16 ft', '--units', 'ft', '--skirt-to', '-2 ft 6 in');
    expect(s.radius).toBeCloseTo(8, 12);
    expect(s.struts[0].length).toBeCloseTo(0.25318 * 8, 4);
    expect(s.skirtPanels).toBe(20);
    const soup = parseTriangleFile(readFileSync(at('school.obj')), 'school.obj');
    let top = -Infinity;
    let bottom = Infinity;
    for (let i = 2; i < soup.positions.length; i += 3) {
      top = Math.max(top, soup.positions[i]);
      bottom = Math.min(bottom, soup.positions[i]);
    }
    expect(top).toBeCloseTo(8, 6);
    expect(bottom).toBeCloseTo(-2.5, 6);
    expect(readFileSync(at('school.obj'), 'utf8')).toMatch(/^# skyfold geodesic: 4V/);
  });

  it('prints the build sheet as text: struts by length with counts, triangles by kind', async () => {
    const r = await skyfold(['geodesic', at('sheet.obj'), '--frequency', '3', '--radius', '2.5']);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/wrote .*sheet\.obj: 3V class I icosahedral geodesic, radius 2\.5 m/);
    expect(r.stdout).toMatch(/A\s+0\.34862\s+0\.872 m\s+\d+/);
    expect(r.stdout).toMatch(/AAB\s+\d+/);
  });

  it('--azimuth turns the pattern: the first ring hub moves from azimuth 0 to 30', async () => {
    await sheet(at('turned.obj'), '--frequency', '1', '--radius', '1', '--truncation', '1', '--azimuth', '30');
    const soup = parseTriangleFile(readFileSync(at('turned.obj')), 'turned.obj');
    const az: number[] = [];
    for (let i = 0; i < soup.positions.length; i += 3) {
      const z = soup.positions[i + 2];
      if (Math.abs(z - 1 / Math.sqrt(5)) < 1e-6) az.push(((Math.atan2(soup.positions[i], soup.positions[i + 1]) * 180) / Math.PI + 360) % 360);
    }
    expect(az.sort((a, b) => a - b).map((a) => Number(a.toFixed(4)))).toEqual([30, 102, 174, 246, 318]);
  });

  const bad: [string, string[], RegExp][] = [
    ['no size', ['--frequency', '3'], /--radius or --diameter/],
    ['both sizes', ['--frequency', '3', '--radius', '1', '--diameter', '2'], /--radius or --diameter/],
    ['frequency 0', ['--frequency', '0', '--radius', '1'], /--frequency.*1 to 64/],
    ['a skirt above the base', ['--frequency', '2', '--radius', '1', '--skirt-to', '0.5'], /--skirt-to: the wall must reach below the base ring/],
    ['a bad length', ['--frequency', '2', '--radius', '3 furlongs'], /--radius: expected a length/],
    ['a bad fraction', ['--frequency', '2', '--radius', '1', '--truncation', '3/2'], /--truncation.*fraction/],
  ];
  for (const [name, args, message] of bad) {
    it(`refuses ${name} with one line, exit 2, and writes nothing`, async () => {
      const out = at(`bad-${name.replace(/\W+/g, '-')}.obj`);
      const r = await skyfold(['geodesic', out, ...args]);
      expect(r.code).toBe(2);
      expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(message);
      expect(existsSync(out)).toBe(false);
    });
  }

  it('refuses to overwrite without --force', async () => {
    writeFileSync(at('taken.obj'), 'keep me\n');
    const r = await skyfold(['geodesic', at('taken.obj'), '--frequency', '2', '--radius', '1']);
    expect(r.code).toBe(2);
    expect(readFileSync(at('taken.obj'), 'utf8')).toBe('keep me\n');
    expect((await skyfold(['geodesic', at('taken.obj'), '--frequency', '2', '--radius', '1', '--force'])).code).toBe(0);
  });

  it('the school demo rig\'s mesh is what its header command writes, and the rig loads without a warning', async () => {
    const rigText = readFileSync(join(FIXTURES, 'school-dome-rig.yaml'), 'utf8');
    const command = /^#\s+skyfold (geodesic fixtures\/school-dome\.obj .*)$/m.exec(rigText)![1];
    const args = command.match(/"[^"]*"|\S+/g)!.map((a) => a.replace(/^"|"$/g, ''));
    args[1] = at('school-again.obj');
    const r = await skyfold(args);
    expect(r.code, r.stderr).toBe(0);
    // the same triangles (the comment lines name the output file, so compare the geometry)
    const geometry = (t: string) => t.split('\n').filter((l) => !l.startsWith('#')).join('\n');
    expect(geometry(readFileSync(at('school-again.obj'), 'utf8'))).toBe(geometry(readFileSync(join(FIXTURES, 'school-dome.obj'), 'utf8')));
    const probe = await skyfold(['probe', join(FIXTURES, 'school-dome-rig.yaml'), '--pixel', '960,200', '--json']);
    expect(probe.code, probe.stderr).toBe(0);
    expect(probe.stderr).toBe('');
    expect(JSON.parse(probe.stdout).results[0].hit).toBe('dome');
  });
});
