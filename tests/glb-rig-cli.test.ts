/**
 * A .glb baked by skyfold stands for the rig (issue 11; DESIGN.md "Commands": "A .glb baked by skyfold
 * carries its rig and stands wherever a rig file does"), and a mesh file given where only a rig will
 * do gets one short line. Run in-process on temporary files.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { demoRigText, skyfold, tempDir } from './support.js';

const dir = tempDir('glb-rig');

/** Same shape, same strings, numbers within tol. */
function expectClose(got: unknown, want: unknown, tol: number, at = '$'): void {
  if (typeof want === 'number') {
    expect(typeof got, at).toBe('number');
    expect(Math.abs((got as number) - want), at).toBeLessThanOrEqual(tol);
  } else if (Array.isArray(want)) {
    expect(Array.isArray(got) && got.length === want.length, at).toBe(true);
    want.forEach((w, i) => expectClose((got as unknown[])[i], w, tol, `${at}[${i}]`));
  } else if (want !== null && typeof want === 'object') {
    expect(Object.keys(got as object).sort(), at).toEqual(Object.keys(want).sort());
    for (const [k, w] of Object.entries(want)) expectClose((got as Record<string, unknown>)[k], w, tol, `${at}.${k}`);
  } else expect(got, at).toEqual(want);
}
const RIG = join(dir, 'rig.yaml');

describe('a .glb baked by skyfold in place of the rig', () => {
  beforeAll(async () => {
    writeFileSync(RIG, demoRigText([480, 300]));
    const r = await skyfold(['bake', RIG, '-o', join(dir, 'm.glb'), '-o', join(dir, 'm.obj'), '-o', join(dir, 'm.csv'), '--grid', '97x61']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
  }, 120_000);

  it('probe and locate answer from the .glb exactly as from the rig file', async () => {
    for (const args of [
      ['probe', '--pixel', '240.5,150.5', '--pixel', '100,40', '--json'],
      ['locate', '--direction', '30,20', '--json'],
    ]) {
      const [cmd, ...rest] = args;
      const fromRig = await skyfold([cmd, RIG, ...rest]);
      const fromGlb = await skyfold([cmd, join(dir, 'm.glb'), ...rest]);
      expect(fromRig.code, fromRig.stderr).toBe(0);
      expect(fromGlb.code, fromGlb.stderr).toBe(0);
      // the .glb holds the rig in metres to 6 digits (9 for directions): the same answers to that
      expectClose(JSON.parse(fromGlb.stdout), JSON.parse(fromRig.stdout), 1e-5);
    }
  });

  it('bake re-bakes from the .glb the same mesh', async () => {
    const again = await skyfold(['bake', join(dir, 'm.glb'), '-o', join(dir, 'again.csv'), '--grid', '97x61']);
    expect(again.code, again.stderr).toBe(0);
    const rows = (f: string) => readFileSync(join(dir, f), 'utf8').trim().split('\n').slice(1).map((l) => l.split(',').map(Number));
    const a = rows('again.csv');
    const b = rows('m.csv');
    expect(a.length).toBe(97 * 61);
    let worst = 0;
    a.forEach((row, i) => row.forEach((x, j) => (worst = Math.max(worst, Math.abs(x - b[i][j])))));
    expect(worst).toBeLessThan(1e-5);
  });

  it('a mesh file where the rig is needed: one short line, exit 2, never the contents', async () => {
    for (const f of ['m.obj', 'm.csv']) {
      const r = await skyfold(['probe', join(dir, f), '--pixel', '1,1']);
      expect(r.code).toBe(2);
      expect(r.stderr).toBe(`skyfold: ${join(dir, f)} is a warp mesh; this command needs the rig (or a .glb baked by skyfold)\n`);
      expect(r.stdout).toBe('');
    }
  });

  it('a .glb that skyfold did not bake: one short line, exit 2', async () => {
    // a minimal binary glTF (glTF 2.0 Sec. 4.4): header, then a JSON chunk padded with spaces to 4 bytes
    const json = new TextEncoder().encode('{"asset":{"version":"2.0"}}  ');
    const glb = new Uint8Array(12 + 8 + json.length);
    const dv = new DataView(glb.buffer);
    dv.setUint32(0, 0x46546c67, true);
    dv.setUint32(4, 2, true);
    dv.setUint32(8, glb.length, true);
    dv.setUint32(12, json.length, true);
    dv.setUint32(16, 0x4e4f534a, true);
    glb.set(json, 20);
    writeFileSync(join(dir, 'other.glb'), glb);
    const r = await skyfold(['probe', join(dir, 'other.glb'), '--pixel', '1,1']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^skyfold: .*other\.glb: not a \.glb baked by skyfold \(no rig in its extras\); this command needs the rig \(or a \.glb baked by skyfold\)\n$/);
  });
});
