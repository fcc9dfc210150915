/**
 * Issue 10: mesh files are read defensively. An MPCDI package's inflated size is bounded (a zip bomb
 * is refused from its declared sizes), its XML is read in one linear pass, its numbers are checked;
 * every reader refuses values no player can use.
 */
import { strFromU8, strToU8, unzipSync, zipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { createMesh, type WarpMesh } from '@skyfold/warp-core';
import { decodeMesh, encodeMesh, type MeshFormat } from '../src/export/index.js';
import { readMpcdi, writeMpcdi } from '../src/export/mpcdi.js';

function smallMesh(): WarpMesh {
  const m = createMesh(5, 4, 64, 40, {});
  for (let i = 0; i < m.u.length; i++) {
    m.u[i] = 0.2 + 0.01 * i;
    m.v[i] = 0.7 - 0.01 * i;
    m.brightness[i] = 1;
    m.mask[i] = 1;
  }
  return m;
}

async function packageWith(edit: (entries: Record<string, Uint8Array>) => void): Promise<Uint8Array> {
  const entries = unzipSync(await writeMpcdi(smallMesh()));
  edit(entries);
  return zipSync(entries, { level: 6 });
}

const xmlEdit = (f: (xml: string) => string) => (e: Record<string, Uint8Array>) => void (e['mpcdi.xml'] = strToU8(f(strFromU8(e['mpcdi.xml']))));

describe('MPCDI packages', () => {
  it('reads back what it wrote (the checks refuse nothing good)', async () => {
    const { mesh } = await readMpcdi(await writeMpcdi(smallMesh()));
    expect(mesh.cols).toBeGreaterThanOrEqual(5);
    expect(mesh.u.every((u) => u > 0.1 && u < 0.5)).toBe(true);
  });

  it('a zip-bomb entry (80 MB of zeros in a few hundred kB) is refused from its declared size', async () => {
    const bytes = await packageWith((e) => void (e['padding.bin'] = new Uint8Array(80 * 2 ** 20)));
    expect(bytes.length).toBeLessThan(2 * 2 ** 20);
    await expect(readMpcdi(bytes)).rejects.toThrow(/padding\.bin" inflates to 80 MB, beyond the 64 MB/);
  });

  it('200 000 tags in mpcdi.xml are read in one pass', { timeout: 30_000 }, async () => {
    // the old reader's lazy regex from each <geometryWarpFile> to a <path> was quadratic in such a file
    const junk = '<geometryWarpFile></geometryWarpFile>'.repeat(200_000);
    const bytes = await packageWith(xmlEdit((x) => x.replace(/<geometryWarpFile>[\s\S]*?<\/geometryWarpFile>/, junk)));
    await expect(readMpcdi(bytes)).rejects.toThrow(/Expected the geometry warp file "\(no path\)"/);
  });

  it.each([
    ['a negative resolution', '-64'],
    ['a fractional resolution', '64.5'],
    ['an absurd resolution', '1e12'],
    ['a word', 'wide'],
  ])('%s in the region is refused', async (_label, value) => {
    const bytes = await packageWith(xmlEdit((x) => x.replace(/(<region [^>]*?)xResolution="\d+"/, `$1xResolution="${value}"`)));
    await expect(readMpcdi(bytes)).rejects.toThrow(/xResolution|pixels a side/);
  });

  it('NaN in the warp (MPCDI: no data) never reaches the mesh as a NaN coordinate', async () => {
    const m = smallMesh();
    m.u[7] = Number.NaN;
    m.v[7] = Number.NaN;
    const { mesh } = await readMpcdi(await writeMpcdi(m));
    expect(mesh.u.every(Number.isFinite) && mesh.v.every(Number.isFinite)).toBe(true);
  });
});

describe('every mesh reader refuses unusable values', () => {
  const formats: MeshFormat[] = ['glb', 'obj', 'pfm', 'csv'];
  it.each(formats)('%s with a NaN fisheye coordinate', async (format) => {
    const m = smallMesh();
    m.u[6] = Number.NaN;
    // the CSV reader refuses a NaN field itself; the others reach the common check
    await expect(decodeMesh(await encodeMesh(m, format), format)).rejects.toThrow(/fisheye \(u, v\)|Expected \d+ numbers on CSV line/);
  });

  it.each(['glb', 'obj', 'csv'] as MeshFormat[])('%s with a brightness of 2', async (format) => {
    const m = smallMesh();
    m.brightness[3] = 2;
    await expect(decodeMesh(await encodeMesh(m, format), format)).rejects.toThrow(/brightness and mask in \[0, 1\]/);
  });

  it.each(['glb', 'obj', 'csv'] as MeshFormat[])('%s with a projector frame of 100 000 pixels a side', async (format) => {
    const m = smallMesh();
    m.width = 100_000;
    await expect(decodeMesh(await encodeMesh(m, format), format)).rejects.toThrow(/at most 8192 pixels a side/);
  });
});
