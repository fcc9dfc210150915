import { describe, expect, it } from 'vitest';
import { Document, NodeIO } from '@gltf-transform/core';
import { unzipSync, strFromU8 } from 'fflate';
import sharp from 'sharp';
// @ts-expect-error gltf-validator ships no type declarations
import validator from 'gltf-validator';
import { createMesh, type WarpMesh } from '@skyfold/warp-core';
import { decodeMesh, encodeMesh, formatFromPath, MESH_FORMATS } from '../src/export/index.js';
import { readCsv, writeCsv } from '../src/export/csv.js';
import { readGlb, writeGlb } from '../src/export/glb.js';
import { readMpcdi, writeMpcdi } from '../src/export/mpcdi.js';
import { readObj, writeObj } from '../src/export/obj.js';
import { decodePfm, encodePfm, readMeshPfm, writeMeshPfm } from '../src/export/pfm.js';
import { readMapPng, writeMapPng } from '../src/export/png16.js';

const COLS = 5;
const ROWS = 3;
const MASKED = { c: 3, r: 2 };

/** An asymmetric 5×3 mesh: u and v each depend on both column and row, differently; one vertex masked, one soft. */
function testMesh(): WarpMesh {
  const mesh = createMesh(COLS, ROWS, 40, 20, { rig: { name: 'test rig' }, bake: { step: 10 } });
  for (let r = 0; r < ROWS; r++) {
    for (let c = 0; c < COLS; c++) {
      const i = r * COLS + c;
      mesh.u[i] = (c / (COLS - 1)) * 0.9 + 0.03 + 0.01 * r;
      mesh.v[i] = 0.05 + 0.4 * r + 0.005 * c;
      mesh.brightness[i] = 0.5 + 0.1 * c - 0.05 * r;
      mesh.mask[i] = 1;
    }
  }
  mesh.mask[MASKED.r * COLS + MASKED.c] = 0;
  mesh.mask[1 * COLS + 0] = 0.5;
  return mesh;
}

const idx = (c: number, r: number): number => r * COLS + c;
/** The test mesh's (u, v) at a continuous grid position (c, r): it is linear in both. */
const linearUv = (c: number, r: number): [number, number] => [(c / (COLS - 1)) * 0.9 + 0.03 + 0.01 * r, 0.05 + 0.4 * r + 0.005 * c];

function expectSameGrid(got: WarpMesh, want: WarpMesh, tol: number, arrays: Array<'u' | 'v' | 'brightness' | 'mask'> = ['u', 'v', 'brightness', 'mask']): void {
  expect([got.cols, got.rows]).toEqual([want.cols, want.rows]);
  for (const f of arrays) {
    for (let i = 0; i < want.u.length; i++) {
      if (tol === 0) expect(got[f][i], `${f}[${i}]`).toBe(want[f][i]);
      else expect(Math.abs(got[f][i] - want[f][i]), `${f}[${i}]`).toBeLessThanOrEqual(tol);
    }
  }
}

/** A hand-rolled GLB parse (Khronos glTF 2.0 spec, "Binary glTF Layout"): JSON chunk and BIN chunk. */
function parseGlb(bytes: Uint8Array): { json: any; bin: DataView } {
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  expect(dv.getUint32(0, true)).toBe(0x46546c67); // "glTF"
  expect(dv.getUint32(4, true)).toBe(2);
  const jsonLen = dv.getUint32(12, true);
  expect(dv.getUint32(16, true)).toBe(0x4e4f534a); // "JSON"
  const json = JSON.parse(new TextDecoder().decode(bytes.subarray(20, 20 + jsonLen)));
  const binStart = 20 + jsonLen;
  const binLen = dv.getUint32(binStart, true);
  expect(dv.getUint32(binStart + 4, true)).toBe(0x004e4942); // "BIN\0"
  return { json, bin: new DataView(bytes.buffer, bytes.byteOffset + binStart + 8, binLen) };
}

function readAccessor(json: any, bin: DataView, index: number): number[] {
  const acc = json.accessors[index];
  const view = json.bufferViews[acc.bufferView];
  const size = { SCALAR: 1, VEC2: 2, VEC3: 3, VEC4: 4 }[acc.type as 'SCALAR'];
  const bytesPer = { 5126: 4, 5125: 4, 5123: 2 }[acc.componentType as 5126];
  const stride = view.byteStride ?? size * bytesPer;
  const out: number[] = [];
  for (let e = 0; e < acc.count; e++) {
    for (let k = 0; k < size; k++) {
      const at = (view.byteOffset ?? 0) + (acc.byteOffset ?? 0) + e * stride + k * bytesPer;
      out.push(acc.componentType === 5126 ? bin.getFloat32(at, true) : acc.componentType === 5125 ? bin.getUint32(at, true) : bin.getUint16(at, true));
    }
  }
  return out;
}

describe('glb', () => {
  it('passes the Khronos glTF validator with no errors and no warnings', async () => {
    const bytes = await writeGlb(testMesh());
    // Khronos glTF 2.0 spec via gltf-validator
    const report = await validator.validateBytes(bytes);
    expect(report.issues.numErrors).toBe(0);
    expect(report.issues.numWarnings).toBe(0);
    // The one remaining notice is informational (severity 2): no texture on the material samples
    // TEXCOORD_0 — the fisheye coordinates are for the playback's own shader.
    expect(report.issues.messages).toEqual([
      expect.objectContaining({ code: 'UNUSED_OBJECT', severity: 2, pointer: '/meshes/0/primitives/0/attributes/TEXCOORD_0' }),
    ]);
  });

  it('lays out POSITION in NDC (y up), TEXCOORD_0 unflipped, COLOR_0 = (b, b, b, mask), CCW from +z', async () => {
    const mesh = testMesh();
    const { json, bin } = parseGlb(await writeGlb(mesh));
    expect(json.extensionsUsed).toContain('KHR_materials_unlit');
    expect(json.materials[0].doubleSided).toBe(true);
    expect(json.extras.skyfoldMesh).toEqual({ version: 1, cols: 5, rows: 3, width: 40, height: 20 });
    expect(json.extras.rig).toEqual({ name: 'test rig' });
    const prim = json.meshes[0].primitives[0];
    expect(prim.mode ?? 4).toBe(4);
    expect(json.accessors[prim.attributes.POSITION]).toMatchObject({ type: 'VEC3', componentType: 5126 });
    expect(json.accessors[prim.attributes.TEXCOORD_0]).toMatchObject({ type: 'VEC2', componentType: 5126 });
    expect(json.accessors[prim.attributes.COLOR_0]).toMatchObject({ type: 'VEC4', componentType: 5126 });
    expect(json.accessors[prim.indices].componentType).toBe(5123); // UNSIGNED_SHORT fits 15 vertices
    const pos = readAccessor(json, bin, prim.attributes.POSITION);
    const uv = readAccessor(json, bin, prim.attributes.TEXCOORD_0);
    const col = readAccessor(json, bin, prim.attributes.COLOR_0);
    const ind = readAccessor(json, bin, prim.indices);
    // Vertex 0 is the top-left of the projector frame: NDC (−1, +1); the last is bottom-right (+1, −1).
    expect(pos.slice(0, 3)).toEqual([-1, 1, 0]);
    expect(pos.slice(-3)).toEqual([1, -1, 0]);
    // Vertex (4, 0) is top-right: x = +1, y = +1.
    expect(pos.slice(idx(4, 0) * 3, idx(4, 0) * 3 + 2)).toEqual([1, 1]);
    // glTF 2.0: UV origin top-left, same as ours, so (u, v) as stored.
    const i = idx(4, 1);
    expect(uv[i * 2]).toBe(mesh.u[i]);
    expect(uv[i * 2 + 1]).toBe(mesh.v[i]);
    const m = idx(MASKED.c, MASKED.r);
    expect(col.slice(m * 4, m * 4 + 4)).toEqual([mesh.brightness[m], mesh.brightness[m], mesh.brightness[m], 0]);
    expect(ind.length).toBe((COLS - 1) * (ROWS - 1) * 6);
    for (let t = 0; t < ind.length; t += 3) {
      const [a, b, c] = [ind[t], ind[t + 1], ind[t + 2]];
      const cross = (pos[b * 3] - pos[a * 3]) * (pos[c * 3 + 1] - pos[a * 3 + 1]) - (pos[b * 3 + 1] - pos[a * 3 + 1]) * (pos[c * 3] - pos[a * 3]);
      expect(cross, `triangle ${t / 3}`).toBeGreaterThan(0); // counter-clockwise seen from +z
    }
  });

  it('switches to UNSIGNED_INT indices past 65535 vertices and still validates', async () => {
    const big = createMesh(260, 256, 1920, 1080);
    big.mask.fill(1);
    const bytes = await writeGlb(big);
    const { json } = parseGlb(bytes);
    expect(json.accessors[json.meshes[0].primitives[0].indices].componentType).toBe(5125);
    // Khronos glTF 2.0 spec via gltf-validator
    const report = await validator.validateBytes(bytes);
    expect([report.issues.numErrors, report.issues.numWarnings]).toEqual([0, 0]);
    expect((await readGlb(bytes)).cols).toBe(260);
  });

  it('reads back exactly, meta included', async () => {
    const mesh = testMesh();
    const back = await readGlb(await writeGlb(mesh));
    expectSameGrid(back, mesh, 0);
    expect([back.width, back.height]).toEqual([40, 20]);
    expect(back.meta).toEqual(mesh.meta);
  });

  it('rejects a glb that is not a skyfold mesh, and bytes that are not a glb', async () => {
    const doc = new Document();
    const buf = doc.createBuffer();
    const pos = doc.createAccessor().setType('VEC3').setArray(new Float32Array([0, 0, 0, 1, 0, 0, 0, 1, 0])).setBuffer(buf);
    doc.createScene().addChild(doc.createNode().setMesh(doc.createMesh().addPrimitive(doc.createPrimitive().setAttribute('POSITION', pos))));
    const other = await new NodeIO().writeBinary(doc);
    await expect(readGlb(other)).rejects.toThrow('Expected a skyfold warp mesh glb (root extras.skyfoldMesh) but found none');
    await expect(readGlb(new TextEncoder().encode('not a glb at all'))).rejects.toThrow(/Expected a glTF binary/);
  });
});

describe('obj', () => {
  it('writes NDC positions, flipped vt and CCW faces', () => {
    const mesh = testMesh();
    const lines = writeObj(mesh).split('\n');
    expect(lines[0].startsWith('#')).toBe(true);
    const v = lines.filter((l) => l.startsWith('v ')).map((l) => l.split(' ').slice(1).map(Number));
    const vt = lines.filter((l) => l.startsWith('vt ')).map((l) => l.split(' ').slice(1).map(Number));
    const f = lines.filter((l) => l.startsWith('f ')).map((l) => l.split(' ').slice(1).map((t) => t.split('/').map(Number)));
    expect(v.length).toBe(15);
    expect(v[0].slice(0, 3)).toEqual([-1, 1, 0]); // top-left of the projector frame
    expect(v[idx(0, 2)].slice(0, 3)).toEqual([-1, -1, 0]); // bottom-left
    // vertex colour extension: r g b = brightness·mask
    const m = idx(MASKED.c, MASKED.r);
    expect(v[m].slice(3)).toEqual([0, 0, 0]);
    expect(v[idx(1, 0)][3]).toBeCloseTo(mesh.brightness[idx(1, 0)], 7);
    // Wavefront OBJ: texture origin bottom-left, so t = 1 − v.
    const i = idx(2, 2);
    expect(vt[i][0]).toBeCloseTo(mesh.u[i], 7);
    expect(vt[i][1]).toBeCloseTo(1 - mesh.v[i], 7);
    expect(f.length).toBe(16);
    for (const face of f) {
      for (const [a, b] of face) expect(a).toBe(b); // v and vt share indices, 1-based
      const [p, q, r] = face.map(([a]) => v[a - 1]);
      expect((q[0] - p[0]) * (r[1] - p[1]) - (q[1] - p[1]) * (r[0] - p[0])).toBeGreaterThan(0);
    }
  });

  it('reads back within float32', () => {
    const mesh = testMesh();
    const back = readObj(writeObj(mesh));
    expectSameGrid(back, mesh, 1e-6);
    expect([back.width, back.height]).toEqual([40, 20]);
    expect(back.meta).toEqual(mesh.meta);
    expect(() => readObj('v 0 0 0\n')).toThrow(/skyfold-grid/);
  });
});

describe('pfm', () => {
  it('stores rows bottom to top in the mesh grid file', () => {
    const mesh = testMesh();
    const bytes = writeMeshPfm(mesh);
    const header = 'PF\n5 3\n-1.0\n';
    expect(new TextDecoder().decode(bytes.subarray(0, header.length))).toBe(header);
    expect(bytes.length).toBe(header.length + 15 * 3 * 4);
    const body = new DataView(bytes.buffer, bytes.byteOffset + header.length);
    const at = (k: number): number => body.getFloat32(k * 4, true); // negative scale = little endian
    // PFM: netpbm's definition, rows stored bottom to top — the first row in the body is grid row 2.
    const first = idx(0, 2);
    expect([at(0), at(1), at(2)]).toEqual([mesh.u[first], mesh.v[first], mesh.brightness[first] * mesh.mask[first]]);
    // The last pixel of the body is the top-right vertex (4, 0).
    const last = idx(4, 0);
    expect([at(42), at(43)]).toEqual([mesh.u[last], mesh.v[last]]);
    // Masked vertex (3, 2) sits in the first body row, column 3: channel 3 = 0, u kept.
    expect([at(9), at(11)]).toEqual([mesh.u[idx(3, 2)], 0]);
  });

  it('reads the grid back (brightness = channel 3, mask = channel 3 > 0)', () => {
    const mesh = testMesh();
    const back = readMeshPfm(writeMeshPfm(mesh), { width: 40, height: 20 });
    expectSameGrid(back, mesh, 0, ['u', 'v']);
    for (let i = 0; i < 15; i++) {
      expect(back.brightness[i]).toBe(Math.fround(mesh.brightness[i] * mesh.mask[i]));
      expect(back.mask[i]).toBe(mesh.mask[i] > 0 ? 1 : 0);
    }
    expect([back.width, back.height]).toEqual([40, 20]);
    expect([readMeshPfm(writeMeshPfm(mesh)).width, readMeshPfm(writeMeshPfm(mesh)).height]).toEqual([4, 2]);
  });

  it('encodes and decodes 1-channel images in both row orders, and big-endian files', () => {
    const data = Float32Array.from([1, 2, 3, 4, 5, 6]); // 3×2, top row 1 2 3
    const down = encodePfm({ width: 3, height: 2, channels: 1, data }, { rowOrder: 'top-down' });
    const up = encodePfm({ width: 3, height: 2, channels: 1, data }, { rowOrder: 'bottom-up' });
    const h = 'Pf\n3 2\n-1.0\n'.length;
    expect(new DataView(down.buffer, h).getFloat32(0, true)).toBe(1);
    expect(new DataView(up.buffer, h).getFloat32(0, true)).toBe(4);
    expect(Array.from(decodePfm(down, { rowOrder: 'top-down' }).data)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(Array.from(decodePfm(up, { rowOrder: 'bottom-up' }).data)).toEqual([1, 2, 3, 4, 5, 6]);
    // A positive scale means big-endian samples (netpbm).
    const be = new Uint8Array(h - 1 + 6 * 4);
    be.set(new TextEncoder().encode('Pf\n3 2\n1.0\n'));
    const dv = new DataView(be.buffer, h - 1);
    [4, 5, 6, 1, 2, 3].forEach((x, k) => dv.setFloat32(k * 4, x, false));
    expect(Array.from(decodePfm(be, { rowOrder: 'bottom-up' }).data)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(() => decodePfm(new TextEncoder().encode('P6\n1 1\n255\n'), { rowOrder: 'bottom-up' })).toThrow(/PFM magic/);
  });
});

describe('mpcdi', () => {
  const date = new Date('2024-05-06T07:08:09Z');

  it('packs mpcdi.xml, a top-down warp PFM and a linear alpha map', async () => {
    const mesh = testMesh();
    const files = unzipSync(await writeMpcdi(mesh, { date }));
    expect(Object.keys(files).sort()).toEqual(['alpha-projector.png', 'mpcdi.xml', 'warp-projector.pfm']);
    const xml = strFromU8(files['mpcdi.xml']);
    // MPCDI 2.0 (VESA) names and casing, as read by public MPCDI readers (SGCT, the MPCDI reference library)
    expect(xml).toMatch(/<MPCDI profile="2d" geometry="1" version="2.0" date="2024-05-06 07:08:09">/);
    expect(xml).toContain('<buffer id="skyfold" xResolution="40" yResolution="20">');
    expect(xml).toContain('<region id="projector" xResolution="40" yResolution="20" x="0" y="0" xsize="1" ysize="1"/>');
    expect(xml).toContain('<fileset region="projector">');
    expect(xml).toMatch(/<geometryWarpFile>\s*<path>warp-projector.pfm<\/path>\s*<interpolation>linear<\/interpolation>\s*<\/geometryWarpFile>/);
    expect(xml).toMatch(/<alphaMap>\s*<path>alpha-projector.png<\/path>\s*<componentDepth>1<\/componentDepth>\s*<bitDepth>8<\/bitDepth>\s*<gammaEmbedded>1.0<\/gammaEmbedded>\s*<\/alphaMap>/);

    const pfm = files['warp-projector.pfm'];
    const header = 'PF\n5 3\n-1.0\n';
    expect(strFromU8(pfm.subarray(0, header.length))).toBe(header);
    const body = new DataView(pfm.buffer, pfm.byteOffset + header.length);
    // MPCDI 2.0 (VESA) §3.6 per DESIGN.md: a fill layout — sample (i, j) of 5 × 3 stands at
    // ((i + 0.5)/5, (j + 0.5)/3) of the region — and the first row is the TOP of the region (§3.6.1),
    // unlike netpbm's PFM. The test mesh's u and v are linear in (c, r), so resampling it is exact.
    for (let j = 0; j < ROWS; j++)
      for (let i = 0; i < COLS; i++) {
        const [u, v] = linearUv(((i + 0.5) * (COLS - 1)) / COLS, ((j + 0.5) * (ROWS - 1)) / ROWS);
        const at = (j * COLS + i) * 12;
        expect(Math.abs(body.getFloat32(at, true) - u), `u of sample ${i}, ${j}`).toBeLessThan(1e-6);
        expect(Math.abs(body.getFloat32(at + 4, true) - v), `v of sample ${i}, ${j}`).toBeLessThan(1e-6);
        expect(body.getFloat32(at + 8, true)).toBe(0); // error estimate: none given
      }

    const png = files['alpha-projector.png'];
    const meta = await sharp(png).metadata();
    expect([meta.format, meta.width, meta.height, meta.channels, meta.depth]).toEqual(['png', 40, 20, 1, 'uchar']);
    const { data } = await sharp(png).extractChannel(0).raw().toBuffer({ resolveWithObject: true });
    // Bilinear brightness·mask at pixel centre (x + 0.5, y + 0.5), the first PNG row at the top.
    const k = (c: number, r: number): number => mesh.brightness[idx(c, r)] * mesh.mask[idx(c, r)];
    const expectAt = (x: number, y: number): number => {
      const gx = ((x + 0.5) * 4) / 40;
      const gy = ((y + 0.5) * 2) / 20;
      const c = Math.min(3, Math.floor(gx));
      const r = Math.min(1, Math.floor(gy));
      const fx = gx - c;
      const fy = gy - r;
      return (k(c, r) * (1 - fx) + k(c + 1, r) * fx) * (1 - fy) + (k(c, r + 1) * (1 - fx) + k(c + 1, r + 1) * fx) * fy;
    };
    for (const [x, y] of [[0, 0], [39, 0], [30, 19], [30, 0], [0, 10], [17, 13]]) {
      expect(Math.abs(data[y * 40 + x] - Math.round(expectAt(x, y) * 255)), `alpha at ${x},${y}`).toBeLessThanOrEqual(1);
    }
    // Near the masked bottom vertex the map is dark; above it, at the top, it is bright.
    expect(data[19 * 40 + 30]).toBeLessThan(20);
    expect(data[0 * 40 + 30]).toBeGreaterThan(200);
  });

  it('writes a 16-bit alpha map on request and reads the warp back exactly', async () => {
    const mesh = testMesh();
    const bytes = await writeMpcdi(mesh, { date, alphaBitDepth: 16, regionId: 'p 1' });
    const back = await readMpcdi(bytes);
    expect(back.profile).toBe('2d');
    expect(back.xml).toContain('<bitDepth>16</bitDepth>');
    expect(back.warpPath).toBe('warp-p_1.pfm');
    expect((await sharp(unzipSync(bytes)[back.alphaPath]).metadata()).depth).toBe('ushort');
    // the warp as stored, and the corner-to-corner mesh it implies: 6 × 4 corners of the 5 × 3 samples
    expect([back.warp.cols, back.warp.rows]).toEqual([COLS, ROWS]);
    expect([back.mesh.cols, back.mesh.rows]).toEqual([COLS + 1, ROWS + 1]);
    for (let r = 0; r <= ROWS; r++)
      for (let c = 0; c <= COLS; c++) {
        const [u, v] = linearUv((c * (COLS - 1)) / COLS, (r * (ROWS - 1)) / ROWS);
        expect(Math.abs(back.mesh.u[r * (COLS + 1) + c] - u), `u at corner ${c}, ${r}`).toBeLessThan(1e-6);
        expect(Math.abs(back.mesh.v[r * (COLS + 1) + c] - v), `v at corner ${c}, ${r}`).toBeLessThan(1e-6);
      }
    expect([back.mesh.width, back.mesh.height]).toEqual([40, 20]);
    // Top-left vertex: alpha at pixel (0, 0) ≈ brightness there (all lit around it).
    expect(back.mesh.brightness[0]).toBeCloseTo(mesh.brightness[0], 1);
    await expect(readMpcdi(new Uint8Array([1, 2, 3]))).rejects.toThrow(/MPCDI package/);
  });

  it('writes no data (NaN, error 1) where a cell has no lit vertex, and reads corners next to it from their neighbours', async () => {
    const mesh = testMesh();
    // the bottom-right cell's four vertices unlit
    for (const [c, r] of [[3, 1], [4, 1], [3, 2], [4, 2]]) mesh.mask[idx(c, r)] = 0;
    const files = unzipSync(await writeMpcdi(mesh, { date }));
    const pfm = decodePfm(files['warp-projector.pfm'], { rowOrder: 'top-down' });
    // sample (4, 2) stands at (4.5/5, 2.5/3) of the frame: grid position (3.6, 1.67), inside that cell
    const k = 3 * idx(4, 2);
    expect(Number.isNaN(pfm.data[k]) && Number.isNaN(pfm.data[k + 1])).toBe(true);
    expect(pfm.data[k + 2]).toBe(1);
    expect(Number.isFinite(pfm.data[3 * idx(0, 0)])).toBe(true);
    const back = await readMpcdi(await writeMpcdi(mesh, { date }));
    for (const x of [...back.mesh.u, ...back.mesh.v]) expect(Number.isFinite(x)).toBe(true);
  });
});

describe('png', () => {
  it('writes a real 16-bit RGBA map, first row at the top, not premultiplied', async () => {
    const mesh = testMesh();
    const bytes = await writeMapPng(mesh);
    const meta = await sharp(bytes).metadata();
    expect([meta.format, meta.width, meta.height, meta.channels, meta.depth]).toEqual(['png', 5, 3, 4, 'ushort']);
    // PNG rows run top to bottom (PNG spec); sample 16-bit raw by hand.
    const { data } = await sharp(bytes).toColorspace('rgb16').raw({ depth: 'ushort' }).toBuffer({ resolveWithObject: true });
    const px = new Uint16Array(data.buffer.slice(data.byteOffset, data.byteOffset + data.byteLength));
    const q = (x: number): number => Math.round(x * 65535);
    const at = (c: number, r: number): number[] => Array.from(px.subarray(idx(c, r) * 4, idx(c, r) * 4 + 4));
    expect(at(4, 0)).toEqual([q(mesh.u[idx(4, 0)]), q(mesh.v[idx(4, 0)]), q(mesh.brightness[idx(4, 0)]), 65535]);
    expect(at(0, 2)).toEqual([q(mesh.u[idx(0, 2)]), q(mesh.v[idx(0, 2)]), q(mesh.brightness[idx(0, 2)]), 65535]);
    // Masked vertex: alpha 0, colour channels intact.
    expect(at(MASKED.c, MASKED.r)).toEqual([q(mesh.u[idx(3, 2)]), q(mesh.v[idx(3, 2)]), q(mesh.brightness[idx(3, 2)]), 0]);
    expect(at(0, 1)[3]).toBe(q(0.5));
  });

  it('reads back within 1/65535 and clamps u, v to [0, 1]', async () => {
    const mesh = testMesh();
    const back = await readMapPng(await writeMapPng(mesh));
    expectSameGrid(back, mesh, 0.5 / 65535 + 1e-7);
    const wild = testMesh();
    wild.u[0] = 1.2;
    wild.v[0] = -0.1;
    const clamped = await readMapPng(await writeMapPng(wild));
    expect([clamped.u[0], clamped.v[0]]).toEqual([1, 0]);
  });
});

describe('csv', () => {
  it('writes one line per vertex with pixel positions, and reads back exactly', () => {
    const mesh = testMesh();
    const text = writeCsv(mesh);
    const lines = text.trim().split('\n');
    expect(lines[0]).toBe('column,row,x,y,u,v,brightness,mask');
    expect(lines.length).toBe(16);
    const f = (c: number, r: number): number[] => lines[1 + idx(c, r)].split(',').map(Number);
    expect(f(4, 0).slice(0, 4)).toEqual([4, 0, 40, 0]); // top-right: x = width, y = 0
    expect(f(1, 2).slice(0, 4)).toEqual([1, 2, 10, 20]); // bottom row: y = height
    expect(Math.fround(f(1, 2)[4])).toBe(mesh.u[idx(1, 2)]);
    expect(f(3, 2)[7]).toBe(0);
    const back = readCsv(text);
    expectSameGrid(back, mesh, 0);
    expect([back.width, back.height]).toEqual([40, 20]);
    expect(() => readCsv('a,b\n')).toThrow(/CSV header/);
  });
});

describe('format front door', () => {
  it('maps file names to formats', () => {
    expect(formatFromPath('out/mesh.GLB')).toBe('glb');
    expect(formatFromPath('mesh.mpcdi')).toBe('mpcdi');
    expect(formatFromPath('mesh.png')).toBe('png');
    expect(formatFromPath('mesh.txt')).toBeUndefined();
    expect(formatFromPath('mesh')).toBeUndefined();
  });

  it('encodes and decodes every format, each vertex where it belongs', async () => {
    const mesh = testMesh();
    for (const format of MESH_FORMATS) {
      const back = await decodeMesh(await encodeMesh(mesh, format), format);
      if (format === 'mpcdi') {
        // MPCDI's own fill layout comes back as the corners of its samples: 6 × 4, the same linear (u, v)
        expect([back.cols, back.rows]).toEqual([COLS + 1, ROWS + 1]);
        for (let k = 0; k < back.u.length; k++) {
          const [u, v] = linearUv(((k % (COLS + 1)) * (COLS - 1)) / COLS, (Math.floor(k / (COLS + 1)) * (ROWS - 1)) / ROWS);
          expect(Math.abs(back.u[k] - u) + Math.abs(back.v[k] - v)).toBeLessThan(2e-6);
        }
        continue;
      }
      const tol = format === 'png' ? 1e-5 : 1e-6;
      expectSameGrid(back, mesh, tol, ['u', 'v']);
    }
  });
});
