/**
 * Issue 10, the attacks kept as tests: fast-check generates malformed and extreme rig documents (YAML
 * and JSON), dome mesh files (OBJ, STL, PLY) and damaged .glb meshes, and runs each through the CLI's
 * entry point in-process. Every run must end in exit 0 or 2; exit 2 with one line naming the file; no
 * NaN or null in any JSON output; no file left behind; no run longer than a generous bound (a hang).
 *
 * The everyday suite runs a few hundred cases with a fixed seed. A bigger run on demand:
 *   SKYFOLD_FUZZ_RUNS=5000 SKYFOLD_FUZZ_SEED=42 npx vitest run tests/robust-fuzz.test.ts
 * The tally of every run is printed at the end (inputs tried, other exits, hangs, NaN outputs, files left).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { stringify as toYaml } from 'yaml';
import { createMesh } from '@skyfold/warp-core';
import { writeGlb } from '@skyfold/warp-cli';
import { runCli, type CliRun } from './robust-harness.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const SCALE = Number(process.env.SKYFOLD_FUZZ_RUNS ?? 0) > 0 ? Number(process.env.SKYFOLD_FUZZ_RUNS) / 300 : 1;
const runs = (n: number) => Math.max(1, Math.round(n * SCALE));
const SEED = process.env.SKYFOLD_FUZZ_SEED !== undefined ? Number(process.env.SKYFOLD_FUZZ_SEED) : 20261202;
/** Far beyond any case here (most take milliseconds): only a hang reaches it. */
const HANG_MS = 30_000;

const tally = { inputs: 0, exit0: 0, exit1: 0, exit2: 0, otherExits: 0, hangs: 0, nanOutputs: 0, filesLeft: 0, badLines: 0 };
let dir: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-fuzz-'));
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
  console.log(`skyfold fuzz tally (seed ${SEED}): ${JSON.stringify(tally)}`);
});

const DEMO_RIG: Record<string, any> = {
  units: 'm',
  dome: { diameter: 5, floor: 0.5 },
  mirror: { radius: 0.3, center: [0, -1.95, 0.15], axis: [0, 1, 1], capAngle: 90 },
  projector: { position: [0, -0.75, 0.1], lookAt: [0, -1.95, 0.25], roll: 0, resolution: [96, 60], throwRatio: 1.6, lensShift: [0, 0] },
  content: { fov: 180, eye: [0, 0, 0] },
};
const MESH_RIG = JSON.parse(readFileSync(join(ROOT, 'fixtures', 'vectors', 'vectors-c.json'), 'utf8')).rig as Record<string, any>;
MESH_RIG.projector.resolution = [64, 40];
const DOME_OBJ = readFileSync(join(ROOT, 'fixtures', 'vectors', 'vectors-c-dome.obj'), 'utf8');

const PATHS = [
  'units', 'name', 'notes', 'dome', 'dome.radius', 'dome.diameter', 'dome.floor', 'dome.mesh', 'dome.meshUnits',
  'mirror', 'mirror.radius', 'mirror.center', 'mirror.center.0', 'mirror.axis', 'mirror.axis.2', 'mirror.capAngle', 'mirror.cap',
  'projector', 'projector.position', 'projector.position.1', 'projector.lookAt', 'projector.roll', 'projector.up', 'projector.resolution',
  'projector.resolution.0', 'projector.throwRatio', 'projector.lensShift', 'projector.body', 'projector.aperture', 'content', 'content.fov', 'content.eye',
];

/** Values a hostile or unlucky user puts in a field. */
const weird: fc.Arbitrary<unknown> = fc.oneof(
  fc.constantFrom(0, -0, 1, -1, 5e-324, 1e-320, 1e-300, 1e-12, 1e-6, 0.5, 90, 180, 360, 361, 8192, 8193, 2 ** 31, 2 ** 53 + 1, 1e12, 1e300, 1.7976931348623157e308, -1e308),
  fc.double({ noNaN: false }),
  fc.integer({ min: -1e9, max: 1e9 }),
  fc.constantFrom('', ' ', 'm', 'ft', 'parsecs', '7 ft 6 in', '1/0 in', '0/0 ft', '1e400 m', '-3 in', '3/4 in', '9 ft 1 1/2 in', 'NaN', 'Infinity', '∞', '\u0000', 'x'.repeat(5000)),
  fc.string({ maxLength: 40 }),
  fc.constant(null),
  fc.boolean(),
  fc.array(fc.oneof(fc.double(), fc.string({ maxLength: 5 }), fc.constant(null)), { maxLength: 5 }),
  fc.array(fc.integer({ min: -10, max: 1e7 }), { minLength: 2, maxLength: 2 }),
  fc.dictionary(fc.string({ maxLength: 8 }), fc.oneof(fc.double(), fc.string({ maxLength: 8 })), { maxKeys: 4 }),
);

type Edit = { path: string; kind: 'set' | 'delete' | 'unknown'; value: unknown; key: string };
const edit: fc.Arbitrary<Edit> = fc.record({
  path: fc.constantFrom(...PATHS),
  kind: fc.constantFrom('set', 'set', 'set', 'delete', 'unknown'),
  value: weird,
  key: fc.oneof(fc.string({ maxLength: 12 }), fc.constantFrom('radius', 'raduis', 'Units', '__proto__', 'constructor', 'toString')),
});

function applyEdits(base: Record<string, any>, edits: Edit[]): Record<string, any> {
  const doc = structuredClone(base);
  for (const e of edits) {
    const parts = e.path.split('.');
    let parent: any = doc;
    for (const p of parts.slice(0, -1)) {
      if (parent === null || typeof parent !== 'object') break;
      parent = parent[p];
    }
    if (parent === null || typeof parent !== 'object') continue;
    const last = parts[parts.length - 1];
    if (e.kind === 'delete') delete parent[last];
    else if (e.kind === 'set') parent[last] = e.value;
    else if (parent[last] !== null && typeof parent[last] === 'object' && !Array.isArray(parent[last])) Object.defineProperty(parent[last], e.key, { value: e.value, enumerable: true, configurable: true, writable: true });
  }
  return doc;
}

/** Damage to the text after it is written: a cut, an insertion, a doubled or swapped piece. */
const damage = fc.option(
  fc.record({ at: fc.double({ min: 0, max: 1, noNaN: true }), kind: fc.constantFrom('cut', 'insert', 'double'), text: fc.oneof(fc.string({ maxLength: 6 }), fc.constantFrom('{', '[', ': ', '&a ', '*a', '"', '\n  - ', '\t', '\u0000', '#', ',,', '}}')) }),
  { freq: 3 },
);

function damaged(text: string, d: { at: number; kind: string; text: string } | null): string {
  if (!d) return text;
  const i = Math.floor(d.at * text.length);
  if (d.kind === 'cut') return text.slice(0, i);
  if (d.kind === 'insert') return text.slice(0, i) + d.text + text.slice(i);
  return text.slice(0, i) + text.slice(Math.floor(i / 2), i) + text.slice(i);
}

function serialize(doc: unknown, format: 'yaml' | 'json'): string {
  if (format === 'json') return JSON.stringify(doc) ?? 'null';
  try {
    return toYaml(doc);
  } catch {
    return JSON.stringify(doc) ?? 'null';
  }
}

/** A non-finite number or null anywhere in a JSON value (JSON.stringify writes NaN as null). */
function hasNullOrNaN(v: unknown): boolean {
  const stack = [v];
  while (stack.length) {
    const x = stack.pop();
    if (x === null || (typeof x === 'number' && !Number.isFinite(x))) return true;
    if (typeof x === 'object') stack.push(...Object.values(x as object));
  }
  return false;
}

async function withBound(run: Promise<CliRun>): Promise<CliRun | 'hang'> {
  let timer: NodeJS.Timeout | undefined;
  const hang = new Promise<'hang'>((resolve) => (timer = setTimeout(() => resolve('hang'), HANG_MS)));
  try {
    return await Promise.race([run, hang]);
  } finally {
    clearTimeout(timer);
  }
}

/** Runs one case in its own folder and checks the promises; `names` are files the run may name and leave. */
async function check(folder: string, args: string[], names: string[], outputs: string[] = []): Promise<void> {
  tally.inputs++;
  const before = new Set(readdirSync(folder));
  const r = await withBound(runCli(...args));
  if (r === 'hang') {
    tally.hangs++;
    expect.fail(`no answer in ${HANG_MS} ms: ${args.join(' ')}`);
  }
  if (r.code === 0) tally.exit0++;
  else if (r.code === 1) tally.exit1++;
  else if (r.code === 2) tally.exit2++;
  else tally.otherExits++;
  expect([0, 2], `exit ${r.code}: ${r.stderr.slice(0, 500)}`).toContain(r.code);
  const errors = r.stderr.trimEnd().split('\n').filter((l) => l !== '' && !l.startsWith('skyfold: warning: '));
  if (r.code === 2) {
    const ok = errors.length === 1 && errors[0].startsWith('skyfold: ') && names.some((n) => errors[0].includes(n)) && errors[0].length < 400 && !/internal error/.test(errors[0]);
    if (!ok) tally.badLines++;
    expect(ok, `error lines: ${JSON.stringify(errors).slice(0, 800)}`).toBe(true);
  } else {
    expect(errors, r.stderr.slice(0, 500)).toEqual([]);
    if (args.includes('--json')) {
      const nan = hasNullOrNaN(JSON.parse(r.stdout));
      if (nan) tally.nanOutputs++;
      expect(nan, `null or NaN in ${r.stdout.slice(0, 500)}`).toBe(false);
    }
  }
  const left = readdirSync(folder).filter((n) => !before.has(n) && !(r.code === 0 && outputs.includes(n)));
  if (left.length > 0) tally.filesLeft++;
  expect(left, 'files left behind').toEqual([]);
}

let caseNo = 0;
function caseFolder(): string {
  const f = join(dir, `case-${caseNo++}`);
  mkdirSync(f);
  return f;
}

describe('fuzz: rig documents through the CLI', () => {
  it('probe: malformed and extreme rigs end in exit 0 or 2 with one line naming the file', async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(edit, { minLength: 1, maxLength: 4 }), fc.constantFrom('yaml', 'json') as fc.Arbitrary<'yaml' | 'json'>, damage, async (edits, format, dmg) => {
        const folder = caseFolder();
        const path = join(folder, `rig.${format}`);
        writeFileSync(path, damaged(serialize(applyEdits(DEMO_RIG, edits), format), dmg));
        await check(folder, ['probe', path, '--pixel', '48,30', '--pixel', '0,0', '--pixel', '95.9,59.9', '--json'], [path]);
      }),
      { numRuns: runs(200), seed: SEED },
    );
  });

  it('bake: malformed rigs end in exit 0 or 2; a failed bake leaves no file', async () => {
    await fc.assert(
      fc.asyncProperty(fc.array(edit, { minLength: 1, maxLength: 2 }), damage, async (edits, dmg) => {
        const folder = caseFolder();
        const path = join(folder, 'rig.yaml');
        writeFileSync(path, damaged(serialize(applyEdits(DEMO_RIG, edits), 'yaml'), dmg));
        await check(folder, ['bake', path, '-o', join(folder, 'mesh.csv'), '--grid', '9x7', '--json'], [path], ['mesh.csv']);
      }),
      { numRuns: runs(25), seed: SEED },
    );
  });
});

/** Damage to a mesh file's lines: a number replaced, a line dropped or doubled, a count made absurd. */
const lineEdit = fc.record({
  at: fc.double({ min: 0, max: 1, noNaN: true }),
  kind: fc.constantFrom('token', 'drop', 'double', 'junk'),
  token: fc.oneof(fc.constantFrom('nan', 'inf', '-inf', '1e309', '0', '-1', '99999999', '4294967296', '1e-320', '', 'x', '1/2/3', '-0', '3.4e38'), fc.string({ maxLength: 6 })),
});

function editLines(text: string, edits: { at: number; kind: string; token: string }[]): string {
  const lines = text.split('\n');
  for (const e of edits) {
    const i = Math.floor(e.at * lines.length) % Math.max(1, lines.length);
    if (e.kind === 'drop') lines.splice(i, 1);
    else if (e.kind === 'double') lines.splice(i, 0, lines[i] ?? '');
    else if (e.kind === 'junk') lines.splice(i, 0, e.token);
    else {
      const words = (lines[i] ?? '').split(' ');
      words[Math.floor(e.at * 7919) % Math.max(1, words.length)] = e.token;
      lines[i] = words.join(' ');
    }
  }
  return lines.join('\n');
}

function stlOf(obj: string): { ascii: string; binary: Uint8Array } {
  const v: number[][] = [];
  const tris: number[][] = [];
  for (const line of obj.split('\n')) {
    const w = line.trim().split(/\s+/);
    if (w[0] === 'v') v.push(w.slice(1, 4).map(Number));
    if (w[0] === 'f') for (let k = 2; k + 1 < w.length; k++) tris.push([w[1], w[k], w[k + 1]].map((s) => Number(s.split('/')[0]) - 1));
  }
  const ascii = ['solid dome', ...tris.map((t) => ['facet normal 0 0 0', ' outer loop', ...t.map((i) => `  vertex ${v[i].join(' ')}`), ' endloop', 'endfacet'].join('\n')), 'endsolid dome'].join('\n');
  const bin = new DataView(new ArrayBuffer(84 + tris.length * 50));
  bin.setUint32(80, tris.length, true);
  tris.forEach((t, k) => t.forEach((i, c) => v[i].forEach((x, a) => bin.setFloat32(84 + k * 50 + 12 + c * 12 + a * 4, x, true))));
  return { ascii, binary: new Uint8Array(bin.buffer) };
}

function plyOf(obj: string): string {
  const v = obj.split('\n').filter((l) => l.startsWith('v '));
  const f = obj.split('\n').filter((l) => l.startsWith('f '));
  const faces = f.map((l) => l.trim().split(/\s+/).slice(1).map((s) => Number(s.split('/')[0]) - 1));
  return ['ply', 'format ascii 1.0', `element vertex ${v.length}`, 'property float x', 'property float y', 'property float z', `element face ${faces.length}`, 'property list uchar int vertex_indices', 'end_header', ...v.map((l) => l.slice(2)), ...faces.map((t) => `${t.length} ${t.join(' ')}`)].join('\n') + '\n';
}

describe('fuzz: dome mesh files through the CLI', () => {
  const { ascii: STL_ASCII, binary: STL_BINARY } = stlOf(DOME_OBJ);
  const PLY = plyOf(DOME_OBJ);

  it('OBJ, STL and PLY with damaged lines or bytes end in exit 0 or 2 naming a file', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom('obj', 'stl', 'stl-binary', 'ply'),
        fc.array(lineEdit, { minLength: 1, maxLength: 5 }),
        fc.array(fc.record({ at: fc.nat(), byte: fc.integer({ min: 0, max: 255 }) }), { maxLength: 6 }),
        async (kind, edits, flips) => {
          const folder = caseFolder();
          const name = kind === 'stl-binary' ? 'dome.stl' : `dome.${kind}`;
          let bytes: Uint8Array;
          if (kind === 'stl-binary') {
            bytes = STL_BINARY.slice();
            for (const f of flips) bytes[f.at % bytes.length] = f.byte;
            // sometimes the triangle count in the header, the one number a reader trusts
            if (flips.length > 3) new DataView(bytes.buffer).setUint32(80, flips[0].at * 7919 + 1, true);
          } else {
            bytes = new TextEncoder().encode(editLines(kind === 'obj' ? DOME_OBJ : kind === 'stl' ? STL_ASCII : PLY, edits));
          }
          const meshPath = join(folder, name);
          writeFileSync(meshPath, bytes);
          const rigPath = join(folder, 'rig.json');
          writeFileSync(rigPath, JSON.stringify({ ...MESH_RIG, dome: { ...MESH_RIG.dome, mesh: name } }));
          await check(folder, ['probe', rigPath, '--pixel', '32,20', '--pixel', '1,1', '--json'], [rigPath, meshPath]);
        },
      ),
      { numRuns: runs(60), seed: SEED },
    );
  });
});

describe('fuzz: damaged .glb meshes through warp', () => {
  it('flipped bytes, cuts and odd values end in exit 2 naming the mesh or the input, writing nothing', async () => {
    const mesh = createMesh(5, 4, 64, 40, { generator: 'fuzz' });
    mesh.u.fill(0.4);
    mesh.v.fill(0.6);
    mesh.brightness.fill(1);
    mesh.mask.fill(1);
    const GLB = await writeGlb(mesh);
    await fc.assert(
      fc.asyncProperty(fc.array(fc.record({ at: fc.nat(), byte: fc.integer({ min: 0, max: 255 }) }), { maxLength: 8 }), fc.option(fc.nat(), { freq: 4 }), async (flips, cut) => {
        const folder = caseFolder();
        let bytes = GLB.slice();
        for (const f of flips) bytes[f.at % bytes.length] = f.byte;
        if (cut !== null) bytes = bytes.slice(0, cut % bytes.length);
        const glb = join(folder, 'mesh.glb');
        writeFileSync(glb, bytes);
        const input = join(folder, 'no-such-frame.png');
        await check(folder, ['warp', glb, input, '-o', join(folder, 'out')], [glb, input]);
      }),
      { numRuns: runs(40), seed: SEED },
    );
  });
});
