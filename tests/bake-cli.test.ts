/**
 * `skyfold bake` as a user runs it, in-process on temporary files (STYLE.md 10): every format written,
 * the --json summary, the .glb through the Khronos glTF validator, and bad input refused with exit 2.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { unzipSync } from 'fflate';
// @ts-expect-error gltf-validator ships no type declarations
import validator from 'gltf-validator';
import { DEMO_RIG, skyfold as runSkyfold, tempDir, type Run } from './support.js';

const RIG = DEMO_RIG;

function skyfold(cwd: string, ...args: string[]): Promise<Run> {
  return runSkyfold(args, { cwd });
}

/**
 * A .glb read by hand after the Khronos glTF 2.0 specification, Sec. 4.4 "GLB File Format
 * Specification": a 12-byte header (magic "glTF", version 2, length), a JSON chunk, then a BIN chunk.
 */
function parseGlb(bytes: Uint8Array): { json: any; bin: DataView } {
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  expect(dv.getUint32(0, true)).toBe(0x46546c67); // "glTF"
  expect(dv.getUint32(4, true)).toBe(2);
  expect(dv.getUint32(8, true)).toBe(bytes.byteLength);
  const jsonLen = dv.getUint32(12, true);
  expect(dv.getUint32(16, true)).toBe(0x4e4f534a); // "JSON"
  const json = JSON.parse(new TextDecoder().decode(bytes.subarray(20, 20 + jsonLen)));
  const binAt = 20 + jsonLen;
  expect(dv.getUint32(binAt + 4, true)).toBe(0x004e4942); // "BIN\0"
  const binLen = dv.getUint32(binAt, true);
  return { json, bin: new DataView(bytes.buffer, bytes.byteOffset + binAt + 8, binLen) };
}

/** Float accessor element i, component c (tightly packed or strided), glTF 2.0 Sec. 3.6.2. */
function floatAt(g: { json: any; bin: DataView }, accessor: number, i: number, c: number): number {
  const acc = g.json.accessors[accessor];
  expect(acc.componentType).toBe(5126); // FLOAT
  const view = g.json.bufferViews[acc.bufferView];
  const size = { SCALAR: 1, VEC2: 2, VEC3: 3, VEC4: 4 }[acc.type as string]!;
  const stride = view.byteStride ?? size * 4;
  return g.bin.getFloat32((view.byteOffset ?? 0) + (acc.byteOffset ?? 0) + i * stride + c * 4, true);
}

const SUMMARY_KEYS = ['grid', 'litFraction', 'errorP99Projector', 'errorMaxProjector', 'errorP99Px', 'errorMaxPx', 'brightnessMin', 'brightnessMax', 'files'];

async function expectValidGltf(path: string): Promise<void> {
  // Khronos glTF-Validator (npm gltf-validator): the reference checker of the glTF 2.0 specification.
  const report = await validator.validateBytes(new Uint8Array(readFileSync(path)));
  const errors = report.issues.messages.filter((m: { severity: number }) => m.severity === 0);
  expect(errors, JSON.stringify(errors.slice(0, 5))).toEqual([]);
  expect(report.issues.numErrors).toBe(0);
}

describe('skyfold bake', () => {
  const dir = tempDir('bake-cli');

  it('writes all six formats with an explicit --grid 97x61, and --json reports the summary', async () => {
    const names = ['mesh.glb', 'mesh.obj', 'mesh.pfm', 'mesh.mpcdi', 'mesh.png', 'mesh.csv'];
    const r = await skyfold(dir, 'bake', RIG, ...names.flatMap((n) => ['-o', n]), '--grid', '97x61', '--json');
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    for (const k of SUMMARY_KEYS) expect(s).toHaveProperty(k);
    expect(s.grid).toEqual([97, 61]);
    expect(s.files).toEqual(names);
    expect(s.litFraction).toBeGreaterThan(0.2);
    expect(s.litFraction).toBeLessThan(0.8);
    expect(s.errorP99Projector).toBeGreaterThan(0);
    expect(s.errorP99Projector).toBeLessThanOrEqual(s.errorMaxProjector);
    expect(s.errorP99Px).toBeLessThanOrEqual(s.errorMaxPx);
    expect(s.brightnessMin).toBeGreaterThanOrEqual(0.1 - 1e-6); // the default floor
    expect(s.brightnessMax).toBeLessThanOrEqual(1);
    expect(s.brightnessMin).toBeLessThanOrEqual(s.brightnessMax);
    for (const n of names) expect(existsSync(join(dir, n)), n).toBe(true);
    const n = 97 * 61;

    // .glb: the validator, then the vertex count and grid order read by hand
    await expectValidGltf(join(dir, 'mesh.glb'));
    const glb = parseGlb(readFileSync(join(dir, 'mesh.glb')));
    const attrs = glb.json.meshes[0].primitives[0].attributes;
    expect(glb.json.accessors[attrs.POSITION].count).toBe(n);
    // the first vertex at the frame's top-left (NDC −1, +1), the last at its bottom-right (DESIGN.md)
    expect([floatAt(glb, attrs.POSITION, 0, 0), floatAt(glb, attrs.POSITION, 0, 1)]).toEqual([-1, 1]);
    expect([floatAt(glb, attrs.POSITION, n - 1, 0), floatAt(glb, attrs.POSITION, n - 1, 1)]).toEqual([1, -1]);

    // .csv: header and one row per vertex, the same (u, v, brightness, mask) as the .glb's vertices
    const lines = readFileSync(join(dir, 'mesh.csv'), 'utf8').trim().split(/\r?\n/);
    expect(lines[0].split(',')).toEqual(['column', 'row', 'x', 'y', 'u', 'v', 'brightness', 'mask']);
    expect(lines.length).toBe(n + 1);
    for (const k of [0, 1234, 2960, n - 1]) {
      const [c, row, x, y, u, v, b, m] = lines[k + 1].split(',').map(Number);
      expect([c, row]).toEqual([k % 97, Math.floor(k / 97)]);
      expect([x, y]).toEqual([(c * 1920) / 96, (row * 1200) / 60]);
      expect(u).toBeCloseTo(floatAt(glb, attrs.TEXCOORD_0, k, 0), 6);
      expect(v).toBeCloseTo(floatAt(glb, attrs.TEXCOORD_0, k, 1), 6);
      expect(b).toBeCloseTo(floatAt(glb, attrs.COLOR_0, k, 0), 6);
      expect(m).toBeCloseTo(floatAt(glb, attrs.COLOR_0, k, 3), 6);
    }

    // .pfm: colour PFM, 97 × 61, little-endian (netpbm "PFM" definition: "PF", size, negative scale)
    const pfm = readFileSync(join(dir, 'mesh.pfm'));
    const header = pfm.subarray(0, 20).toString('latin1').split('\n');
    expect(header.slice(0, 2)).toEqual(['PF', '97 61']);
    expect(Number(header[2])).toBeLessThan(0);
    const headerLen = header.slice(0, 3).join('\n').length + 1;
    expect(pfm.length).toBe(headerLen + n * 3 * 4);

    // .png: a 16-bit RGBA image of the grid (PNG spec, W3C 2003, Sec. 11.2.2 IHDR)
    const png = readFileSync(join(dir, 'mesh.png'));
    expect([...png.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
    expect(png.subarray(12, 16).toString('latin1')).toBe('IHDR');
    expect([png.readUInt32BE(16), png.readUInt32BE(20), png[24], png[25]]).toEqual([97, 61, 16, 6]);

    // .obj: one v and one vt per vertex, two triangles per cell
    const obj = readFileSync(join(dir, 'mesh.obj'), 'utf8').split('\n');
    expect(obj.filter((l) => l.startsWith('v ')).length).toBe(n);
    expect(obj.filter((l) => l.startsWith('vt ')).length).toBe(n);
    expect(obj.filter((l) => l.startsWith('f ')).length).toBe(2 * 96 * 60);

    // .mpcdi: a zip holding mpcdi.xml of the "2d" profile and the files it names
    const zip = unzipSync(new Uint8Array(readFileSync(join(dir, 'mesh.mpcdi'))));
    const xml = new TextDecoder().decode(zip['mpcdi.xml']);
    expect(xml).toMatch(/<MPCDI[^>]*profile="2d"/);
    for (const [, path] of xml.matchAll(/<path>([^<]+)<\/path>/g)) expect(Object.keys(zip)).toContain(path);
  });

  it('chooses the grid itself when none is given, meeting the default tolerance of 0.5 projector px at p99', async () => {
    const r = await skyfold(dir, 'bake', RIG, '-o', 'auto.glb', '--json');
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    for (const k of SUMMARY_KEYS) expect(s).toHaveProperty(k);
    expect(s.grid[0]).toBeGreaterThan(97); // "expect grids of a few hundred columns" (issue 3)
    expect(s.grid[0]).toBeLessThanOrEqual(1025);
    // rows follow the frame's aspect
    expect(Math.abs((s.grid[1] - 1) / (s.grid[0] - 1) - 1200 / 1920)).toBeLessThan(0.02);
    expect(s.errorP99Projector).toBeLessThanOrEqual(0.5);
    expect(s.files).toEqual(['auto.glb']);
    await expectValidGltf(join(dir, 'auto.glb'));
  });

  it('the plain-text summary names the grid, the errors and the files', async () => {
    const r = await skyfold(dir, 'bake', RIG, '-o', 'text.glb', '--grid', '33x21');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/33 x 21/);
    expect(r.stdout).toMatch(/projector px/);
    expect(r.stdout).toMatch(/text\.glb/);
  });

  const expectOneLineError = (r: RunResult, pattern: RegExp) => {
    expect(r.code).toBe(2);
    expect(r.stdout).toBe('');
    const msg = r.stderr.trim();
    expect(msg.split('\n').length, msg).toBe(1);
    expect(msg).not.toMatch(/\n\s+at /); // no stack trace
    expect(msg).toMatch(pattern);
  };

  it('refuses an unknown extension with exit 2 and one line naming the file, writing nothing', async () => {
    const r = await skyfold(dir, 'bake', RIG, '-o', 'mesh.xyz', '-o', 'other.glb');
    expectOneLineError(r, /mesh\.xyz/);
    expect(existsSync(join(dir, 'mesh.xyz'))).toBe(false);
    expect(existsSync(join(dir, 'other.glb'))).toBe(false);
  });

  it.each([['97'], ['97x'], ['1x61'], ['axb'], ['97x61x3'], ['5000x61']])('refuses --grid %s with exit 2 and one line', async (grid) => {
    const r = await skyfold(dir, 'bake', RIG, '-o', 'bad.glb', '--grid', grid);
    expectOneLineError(r, /--grid/);
    expect(existsSync(join(dir, 'bad.glb'))).toBe(false);
  });
});
