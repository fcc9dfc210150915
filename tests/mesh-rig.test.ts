/**
 * Every command on an as-built dome (DESIGN.md "As-built domes"): the rig of fixtures/vectors/vectors-c
 * (a 2V geodesic on a wall, `dome.mesh`) through probe, locate, bake, warp (from the rig and from the
 * baked .glb), simulate, report, fit, plan and pattern --warp, in process; the .glb carries the dome's
 * triangles; and bad mesh files meet one-line errors naming the file and line, odd ones a warning.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import sharp from 'sharp';
import { parse as parseYaml } from 'yaml';
import { NodeIO } from '@gltf-transform/core';
// @ts-expect-error gltf-validator ships no type declarations
import validator from 'gltf-validator';
import { readGlb } from '@skyfold/warp-cli';
import { parseTriangleFile, rigFromDocument, Tracer } from '@skyfold/warp-core';
import { FIXTURES, skyfold, tempDir, type Run } from './support.js';

const dir = tempDir('mesh-rig');
const vectors = JSON.parse(readFileSync(join(FIXTURES, 'vectors', 'vectors-c.json'), 'utf8'));
const OBJ = readFileSync(join(FIXTURES, 'vectors', 'vectors-c-dome.obj'), 'utf8');
const at = (name: string) => join(dir, name);

beforeAll(() => {
  writeFileSync(at('vectors-c-dome.obj'), OBJ);
  writeFileSync(at('rig.json'), JSON.stringify({ name: 'vectors-c', ...vectors.rig }));
});

/** Exit 2 with one line on standard error naming `file`, no stack and no internal error; the line. */
function userErrorLine(r: Run, file: string): string | undefined {
  const lines = r.stderr.trimEnd().split('\n');
  if (r.code !== 2 || lines.length !== 1 || !lines[0].startsWith('skyfold: ') || !lines[0].includes(file) || /internal error/.test(lines[0])) return undefined;
  return lines[0];
}

const runCli = (...args: string[]) => skyfold(args);

/** The rig as the CLI reads it (the mesh beside it). */
function rig() {
  return rigFromDocument(vectors.rig, { loadMesh: (f) => parseTriangleFile(readFileSync(at(f)), f) });
}

async function ok(...args: string[]) {
  const r = await runCli(...args);
  expect(r.code, `skyfold ${args.join(' ')}\n${r.stderr}`).toBe(0);
  return r;
}

describe('every command on a mesh-dome rig', () => {
  it('locate gives back the pixel of each lit vector, to 1e-6 px; toward the wall, where the mesh is, too', async () => {
    const lit = vectors.results.filter((v: any) => v.hit === 'dome' || v.hit === 'below-horizon');
    const r = await ok('locate', at('rig.json'), '--json', ...lit.flatMap((v: any) => ['--direction', `${v.azimuth},${v.altitude}`]));
    const out = JSON.parse(r.stdout);
    expect(out.results).toHaveLength(lit.length);
    let back = 0;
    out.results.forEach((got: any, i: number) => {
      if (got.pixel === null) return; // a direction seen by two pixels would be fine too; none is here
      expect(Math.hypot(got.pixel[0] - lit[i].pixel[0], got.pixel[1] - lit[i].pixel[1]), JSON.stringify(got)).toBeLessThan(1e-6);
      back++;
    });
    expect(back).toBe(lit.length);
  });

  it('bake writes a .glb that carries the dome mesh; warp from the rig and from the .glb agree', async () => {
    await ok('bake', at('rig.json'), '-o', at('mesh.glb'), '--grid', '129x81');
    const bytes = new Uint8Array(readFileSync(at('mesh.glb')));
    // Khronos glTF-Validator (npm gltf-validator), the reference checker of the glTF 2.0 specification
    const report = await validator.validateBytes(bytes);
    expect(report.issues.numErrors).toBe(0);
    expect(report.issues.numWarnings).toBe(0);
    // the warp mesh reads as before
    const warp = await readGlb(bytes);
    expect([warp.cols, warp.rows]).toEqual([129, 81]);
    // the dome's triangles travel with it, in metres in the world frame, outside the scene a player draws
    const doc = await new NodeIO().readBinary(bytes);
    const dome = doc.getRoot().listMeshes().find((m) => m.getName() === 'as-built-dome');
    expect(dome, 'a mesh named as-built-dome').toBeDefined();
    const prim = dome!.listPrimitives()[0];
    expect(prim.getIndices()!.getCount() / 3).toBe(60);
    const want = rig().dome.mesh!;
    const pos = prim.getAttribute('POSITION')!.getArray()!;
    for (let i = 0; i < want.positions.length; i++) expect(Math.abs(pos[i] - want.positions[i])).toBeLessThan(1e-6);
    const scene = doc.getRoot().getDefaultScene()!;
    expect(scene.listChildren().map((n) => n.getName())).toEqual(['warp-mesh']);
    const extras = doc.getRoot().getExtras() as any;
    expect(extras.rig.dome.mesh).toBe('vectors-c-dome.obj');

    // a dome master to warp: a white disc on black
    await ok('pattern', 'dome', '-o', at('grid.png'), '--size', '256');
    await ok('warp', at('rig.json'), at('grid.png'), '-o', at('from-rig'));
    await ok('warp', at('mesh.glb'), at('grid.png'), '-o', at('from-glb'));
    const a = await sharp(at('from-rig/grid.png')).raw().toBuffer({ resolveWithObject: true });
    expect([a.info.width, a.info.height]).toEqual([1280, 800]);
    // the open pixels of the vectors are black (masked like a miss)
    for (const v of vectors.results.filter((r: any) => r.hit === 'open')) {
      const k = (Math.floor(v.pixel[1]) * a.info.width + Math.floor(v.pixel[0])) * a.info.channels;
      expect(a.data[k] + a.data[k + 1] + a.data[k + 2], `open pixel ${v.pixel}`).toBe(0);
    }
    const b = await sharp(at('from-glb/grid.png')).raw().toBuffer({ resolveWithObject: true });
    let lit = 0;
    for (let i = 0; i < a.data.length; i++) if (a.data[i] > 0) lit++;
    expect(lit).toBeGreaterThan(1000);
    expect([b.info.width, b.info.height]).toEqual([1280, 800]);
  });

  it('simulate shows a warped frame back on the dome', async () => {
    await ok('pattern', 'dome', '--warp', at('rig.json'), '-o', at('warped.png'));
    const r = await ok('simulate', at('rig.json'), at('warped.png'), '-o', at('seen.png'), '--size', '128', '--json');
    expect(existsSync(at('seen.png'))).toBe(true);
    expect(JSON.parse(r.stdout)).toBeTypeOf('object');
  });

  it('report runs on the mesh rig and writes its page', async () => {
    const r = await ok('report', at('rig.json'), '-o', at('report'), '--rays', '4000', '--json');
    const f = JSON.parse(r.stdout);
    expect(f.coverage).toBeDefined();
    // the facets: how far the nominal sphere would misplace content on this 2V mesh
    expect(f.facets.samples).toBeGreaterThan(1000);
    expect(f.facets.worstDegrees).toBeGreaterThanOrEqual(f.facets.medianDegrees);
    expect(f.facets.medianDegrees).toBeGreaterThan(0.5); // a 2V dome is coarser than the issue's 3V at 0.9°
    expect(readFileSync(at('report/report.html'), 'utf8')).toMatch(/The dome as built/);
    expect(existsSync(at('report/report.html'))).toBe(true);
  });

  it('fit recovers a nudged roll from observations made on the mesh', async () => {
    const lit = vectors.results.filter((v: any) => v.hit === 'dome');
    const nudged = { ...vectors.rig, projector: { ...vectors.rig.projector, roll: 1.5 } };
    writeFileSync(at('nudged.json'), JSON.stringify(nudged));
    writeFileSync(
      at('seen.yaml'),
      ['units: m', 'free: [projector.roll]', 'observations:', ...lit.map((v: any) => `  - {pixel: [${v.pixel}], azimuth: ${v.azimuth}, altitude: ${v.altitude}, sigma: 0.01}`)].join('\n') + '\n',
    );
    const r = await ok('fit', at('nudged.json'), at('seen.yaml'), '-o', at('fitted.json'), '--json');
    expect(JSON.parse(r.stdout)).toBeTypeOf('object');
    const fitted = parseYaml(readFileSync(at('fitted.json'), 'utf8'));
    expect(Math.abs(fitted.projector.roll)).toBeLessThan(1e-3);
    expect(fitted.dome.mesh).toBe('vectors-c-dome.obj');
  });

  it('plan searches and writes a rig that keeps the mesh', async () => {
    await ok('plan', at('rig.json'), '--vary', 'projector.lookAt', '--evaluations', '24', '--rays', '4000', '-o', at('planned.yaml'));
    // plan keeps the user's rig document (here JSON inside the YAML file), its dome.mesh with it
    expect(parseYaml(readFileSync(at('planned.yaml'), 'utf8')).dome.mesh).toBe('vectors-c-dome.obj');
  });
});

describe('bad mesh files: one line naming the file and line', () => {
  const cases: [string, string | Uint8Array, RegExp][] = [
    ['truncated.stl', (() => { const b = new Uint8Array(84 + 50); new DataView(b.buffer).setUint32(80, 2, true); return b; })(), /truncated binary STL: the header says 2 triangles/],
    ['empty.obj', 'v 0 0 0\nv 1 0 0\nv 0 1 0\n', /no triangles/],
    ['range.obj', 'v 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 9\n', /line 4: vertex 9 is out of range/],
    ['nan.obj', 'v 0 0 0\nv 1 nan 0\nv 0 1 0\nf 1 2 3\n', /line 2: .*finite number/],
    ['huge.stl', (() => { const b = new Uint8Array(84); new DataView(b.buffer).setUint32(80, 2_000_001, true); return b; })(), /more than 2,000,000 triangles/],
    ['cut.ply', 'ply\nformat ascii 1.0\nelement vertex 3\nproperty float x\nproperty float y\nproperty float z\nelement face 1\nproperty list uchar int vertex_indices\nend_header\n0 0 0\n1 0 0\n', /truncated/],
  ];
  for (const [name, content, message] of cases) {
    it(name, async () => {
      writeFileSync(at(name), content);
      writeFileSync(at(`rig-${name}.json`), JSON.stringify({ ...vectors.rig, dome: { ...vectors.rig.dome, mesh: name } }));
      const r = await runCli('probe', at(`rig-${name}.json`), '--pixel', '600,400');
      const line = userErrorLine(r, name);
      expect(line, r.stderr).toBeDefined();
      expect(line).toMatch(message);
    });
  }

  it('a missing mesh file', async () => {
    writeFileSync(at('rig-missing.json'), JSON.stringify({ ...vectors.rig, dome: { ...vectors.rig.dome, mesh: 'nowhere.obj' } }));
    const r = await runCli('probe', at('rig-missing.json'), '--pixel', '600,400');
    expect(userErrorLine(r, 'nowhere.obj')).toMatch(/no such file/);
  });
});

describe('odd meshes: a warning that says which', () => {
  it('a mesh in centimetres read as metres: its size disagrees with dome.radius', async () => {
    writeFileSync(at('dome-cm.obj'), OBJ.replace(/^v (\S+) (\S+) (\S+)$/gm, (_, x, y, z) => `v ${100 * x} ${100 * y} ${100 * z}`));
    writeFileSync(at('rig-cm.json'), JSON.stringify({ ...vectors.rig, dome: { ...vectors.rig.dome, mesh: 'dome-cm.obj' } }));
    const r = await runCli('probe', at('rig-cm.json'), '--pixel', '600,400');
    expect(r.stderr).toMatch(/dome\.mesh: the mesh's radius is about 300 m but dome\.radius is 3 m.*units/);
  });

  it('a mesh that does not enclose the mirror', async () => {
    // the same dome moved 5 m to the right
    writeFileSync(at('dome-aside.obj'), OBJ.replace(/^v (\S+) /gm, (_, x) => `v ${Number(x) + 5} `));
    writeFileSync(at('rig-aside.json'), JSON.stringify({ ...vectors.rig, dome: { ...vectors.rig.dome, mesh: 'dome-aside.obj' } }));
    const r = await runCli('probe', at('rig-aside.json'), '--pixel', '600,400');
    expect(r.stderr).toMatch(/does not enclose the mirror/);
  });

  it('the vectors-c mesh itself draws no warning', async () => {
    const r = await runCli('probe', at('rig.json'), '--pixel', '600,400');
    expect(r.stderr).toBe('');
  });
});
