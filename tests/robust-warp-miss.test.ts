/**
 * Issue 10: `warp` straight from a rig whose projector misses the mirror wrote black frames with exit 0.
 * It now refuses as `bake` does: exit 2, one line naming the rig and the reason, nothing written.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { skyfold } from './support.js';
import { userErrorLine } from './robust-harness.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const SMALL = readFileSync(join(ROOT, 'fixtures', 'demo-rig.yaml'), 'utf8').replace('resolution: [1920, 1200]', 'resolution: [96, 60]');
let dir: string;
let miss: string;
let show: string;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-warp-miss-'));
  const turned = SMALL.replace('lookAt: [0, -1.95, 0.25]', 'lookAt: [0, 1.95, 0.25]'); // aimed away from the mirror
  expect(turned).not.toBe(SMALL);
  miss = join(dir, 'miss.yaml');
  writeFileSync(miss, turned);
  writeFileSync(join(dir, 'good.yaml'), SMALL);
  show = join(dir, 'show');
  mkdirSync(show);
  await sharp(Buffer.alloc(64 * 64 * 3, 120), { raw: { width: 64, height: 64, channels: 3 } }).png().toFile(join(show, 'a.png'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('warp from a rig whose projector misses the mirror', () => {
  it('a folder of frames: exit 2 with the reason, no output folder made', async () => {
    const out = join(dir, 'out');
    const r = await skyfold(['warp', miss, show, '-o', out, '--json']);
    const line = userErrorLine({ code: r.code ?? -1, stdout: r.stdout, stderr: r.stderr }, miss);
    expect(line, r.stderr).toBeDefined();
    expect(line).toMatch(/nothing to warp: projector: no point of the frame shows content: the projector's frame misses the mirror/);
    expect(r.stdout).toBe('');
    expect(existsSync(out)).toBe(false);
  });

  it('the raw pipe: exit 2 before any frame is read, nothing on standard output', async () => {
    const r = await skyfold(['warp', miss, '--raw-in', '64x64'], { input: Buffer.alloc(64 * 64 * 3, 90) });
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/miss\.yaml: nothing to warp: .*misses the mirror/);
    expect(r.stdoutBytes.length).toBe(0);
  });

  it('the same rig aimed at the mirror warps (the check refuses only the miss)', async () => {
    const out = join(dir, 'out-good');
    const r = await skyfold(['warp', join(dir, 'good.yaml'), show, '-o', out, '--jobs', '1', '--json']);
    expect(r.code, r.stderr).toBe(0);
    expect(readdirSync(out)).toContain('a.png');
  });
});
