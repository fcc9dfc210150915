/**
 * Issue 10, wrong or silent results: every one of these used to end in exit 0 with a wrong answer
 * (or an unreadable file). Each now ends in exit 2 with one short line naming the file and the reason.
 * In-process runs of the CLI entry point on temporary files.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse as parseYaml } from 'yaml';
import { createMesh } from '@skyfold/warp-core';
import { writeGlb } from '@skyfold/warp-cli';
import { runCli, userErrorLine, type CliRun } from './robust-harness.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const DEMO = readFileSync(join(ROOT, 'fixtures', 'demo-rig.yaml'), 'utf8');
const SMALL = DEMO.replace('resolution: [1920, 1200]', 'resolution: [320, 200]');
let dir: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-robust-in-'));
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

function file(name: string, text: string | Uint8Array): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

function refusedLine(r: CliRun, path: string): string {
  const line = userErrorLine(r, path);
  expect(line, `exit ${r.code}\n${r.stderr.slice(0, 2000)}`).toBeDefined();
  expect(line!.length, line).toBeLessThan(400);
  return line!;
}

describe('a projector that misses the mirror', () => {
  it('bake refuses with exit 2 and the reason, writing no mesh', async () => {
    const p = file('miss.yaml', SMALL.replace('lookAt: [0, -1.95, 0.25]', 'lookAt: [0, 1.95, 0.25]'));
    const out = join(dir, 'miss.glb');
    const r = await runCli('bake', p, '-o', out, '--json');
    expect(refusedLine(r, p)).toMatch(/misses the mirror/);
    expect(r.stdout).toBe('');
    expect(existsSync(out)).toBe(false);
  });

  it('a grid too coarse to hold a lit cell is refused as such, not as a miss', async () => {
    const p = file('coarse.yaml', SMALL);
    const r = await runCli('bake', p, '-o', join(dir, 'coarse.glb'), '--grid', '2x2');
    expect(refusedLine(r, p)).toMatch(/too small to measure/);
  });
});

describe('numbers finite and in range at the boundary', () => {
  it('content.fov 1e-320 is refused (it gave NaN fisheye coordinates)', async () => {
    const p = file('fov.yaml', SMALL.replace('fov: 180 ', 'fov: 1e-320 '));
    expect(refusedLine(await runCli('probe', p, '--pixel', '160,100', '--json'), p)).toMatch(/content\.fov: expected a field of view of at least/);
  });

  it('a mirror radius of 1e-300 m is refused, not traced', async () => {
    const p = file('tiny.yaml', SMALL.replace('radius: 0.3', 'radius: 1e-300'));
    expect(refusedLine(await runCli('probe', p, '--pixel', '160,100'), p)).toMatch(/mirror\.radius: expected a positive length of at least 1 micrometre/);
  });
});

describe('duplicate keys', () => {
  it('JSON: "units": "m", "units": "ft" is refused, not read last-wins', async () => {
    const doc = parseYaml(SMALL) as Record<string, unknown>;
    const text = JSON.stringify(doc).replace('"units":"m"', '"units":"m","units":"ft"');
    const p = file('dup.json', text);
    expect(refusedLine(await runCli('probe', p, '--pixel', '160,100'), p)).toMatch(/the key "units" appears twice/);
  });

  it('JSON: a duplicate deep inside a section is found too, with its line', async () => {
    const p = file('dup2.json', '{\n "dome": {"radius": 2.5,\n  "radius": 3}}');
    expect(refusedLine(await runCli('probe', p, '--pixel', '1,1'), p)).toMatch(/line 3, column 3: the key "radius" appears twice/);
  });

  it('JSON: the same key in two different objects is fine', async () => {
    const doc = parseYaml(SMALL) as Record<string, unknown>;
    const p = file('nodup.json', JSON.stringify(doc));
    expect((await runCli('probe', p, '--pixel', '160,100', '--json')).code).toBe(0);
  });

  it('YAML: a duplicate key is refused with its line', async () => {
    const p = file('dup.yaml', SMALL.replace('units: m', 'units: m\nunits: ft'));
    expect(refusedLine(await runCli('probe', p, '--pixel', '160,100'), p)).toMatch(/line 10, column 1: the key "units" appears twice/);
  });
});

describe('input sizes bounded, checks linear', () => {
  // a bound on time, not a measurement of speed: the pairwise check took about a minute here
  it('a YAML of 87 381 keys is refused at once (the duplicate-key check used to compare every pair)', { timeout: 45_000 }, async () => {
    const keys: string[] = [];
    for (let i = 0; i < 87_381; i++) keys.push(`k${i}: ${i}`);
    const p = file('many-keys.yaml', keys.join('\n') + '\n');
    expect(refusedLine(await runCli('probe', p, '--pixel', '1,1'), p)).toMatch(/k0: unknown field/);
  });

  it('a 5 MB rig (a 5 MB name) is refused by its size before parsing', async () => {
    const p = file('huge-name.yaml', SMALL.replace(/^name: .*$/m, `name: "${'x'.repeat(5 * 2 ** 20)}"`));
    expect(refusedLine(await runCli('probe', p, '--pixel', '1,1'), p)).toMatch(/more than the 4 MB allowed/);
  });

  it('a FIFO given as the rig file is refused up front, not read forever', async () => {
    const fifo = join(dir, 'rig-fifo.yaml');
    const { execFileSync } = await import('node:child_process');
    try {
      execFileSync('mkfifo', [fifo]);
    } catch {
      return; // no mkfifo here: nothing to test
    }
    expect(refusedLine(await runCli('probe', fifo, '--pixel', '1,1'), fifo)).toMatch(/not a regular file/);
  });
});

describe('error lines quote at most a short piece of the input', () => {
  it('a 100 000-character unknown key', async () => {
    const p = file('long-key.yaml', SMALL + `${'q'.repeat(100_000)}: 1\n`);
    refusedLine(await runCli('probe', p, '--pixel', '1,1'), p);
  });

  it('a 100 000-character value', async () => {
    const p = file('long-value.yaml', SMALL.replace('radius: 0.3', `radius: "${'7'.repeat(100_000)} ft"`));
    expect(refusedLine(await runCli('probe', p, '--pixel', '1,1'), p)).toMatch(/mirror\.radius/);
  });

  it('a long token in broken JSON', async () => {
    const p = file('long-token.json', `{"units": ${'x'.repeat(100_000)}}`);
    expect(refusedLine(await runCli('probe', p, '--pixel', '1,1'), p)).toMatch(/JSON syntax error/);
  });

  it('a baked mesh given where a rig file goes (as .yaml)', async () => {
    const mesh = createMesh(3, 3, 2, 2, { notes: 'z'.repeat(50_000) });
    mesh.mask.fill(1);
    mesh.brightness.fill(1);
    const p = file('mesh-as-rig.yaml', await writeGlb(mesh));
    refusedLine(await runCli('probe', p, '--pixel', '1,1'), p);
  });
});

describe('.glb values are checked where they are read', () => {
  async function glbWith(name: string, edit: (m: ReturnType<typeof createMesh>) => void): Promise<string> {
    const mesh = createMesh(4, 3, 320, 200, {});
    mesh.u.fill(0.5);
    mesh.v.fill(0.5);
    mesh.brightness.fill(1);
    mesh.mask.fill(1);
    edit(mesh);
    return file(name, await writeGlb(mesh));
  }
  const frame = () => join(dir, 'frame-does-not-matter.png');

  it.each([
    ['NaN texture coordinate', (m: ReturnType<typeof createMesh>) => void (m.u[5] = Number.NaN), /fisheye \(u, v\)/],
    ['infinite texture coordinate', (m: ReturnType<typeof createMesh>) => void (m.v[2] = Number.POSITIVE_INFINITY), /fisheye \(u, v\)/],
    ['huge texture coordinate', (m: ReturnType<typeof createMesh>) => void (m.u[0] = 3e38), /fisheye \(u, v\)/],
    ['NaN brightness', (m: ReturnType<typeof createMesh>) => void (m.brightness[1] = Number.NaN), /brightness and mask/],
    ['mask of 7', (m: ReturnType<typeof createMesh>) => void (m.mask[1] = 7), /brightness and mask/],
    ['extras width 1e9', (m: ReturnType<typeof createMesh>) => void (m.width = 1e9), /at most 8192 pixels a side/],
  ])('%s: warp refuses the mesh with exit 2', async (label, edit, why) => {
    const p = await glbWith(`${label.replace(/\W+/g, '-')}.glb`, edit);
    const r = await runCli('warp', p, frame(), '-o', join(dir, 'out-glb'));
    expect(refusedLine(r, p)).toMatch(why);
    expect(existsSync(join(dir, 'out-glb'))).toBe(false);
  });

  it('a good mesh of the same shape is accepted (the checks do not refuse everything)', async () => {
    const p = await glbWith('good.glb', () => {});
    const r = await runCli('warp', p, join(dir, 'no-such-frame.png'), '-o', join(dir, 'out-good'));
    expect(r.stderr).not.toMatch(new RegExp(p.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')));
  });
});
