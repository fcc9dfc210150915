/**
 * Issue 10, data loss, hangs and files left behind, through the CLI's entry point in-process: a folder
 * of links into the output folder is refused before anything is written; a FIFO among the frames is
 * refused up front; a failure while finishing a frame (the run log) fails that frame and the run ends;
 * temporaries are made exclusively and the run log is never written through a link; a killed bake's
 * temporary is cleaned up by the next run; a full disk (a small tmpfs, when running as root) fails
 * cleanly and leaves no temporary behind.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { runCli, userErrorLine } from './robust-harness.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const RIG_TEXT = readFileSync(join(ROOT, 'fixtures', 'demo-rig.yaml'), 'utf8').replace('resolution: [1920, 1200]', 'resolution: [96, 60]');
let dir: string;
let rig: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-robust-warp-'));
  rig = join(dir, 'rig.yaml');
  writeFileSync(rig, RIG_TEXT);
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

async function frames(folder: string, names: string[], size = 64): Promise<void> {
  mkdirSync(folder, { recursive: true });
  for (const [i, n] of names.entries()) {
    const data = Buffer.alloc(size * size * 3, 40 + 50 * i);
    await sharp(data, { raw: { width: size, height: size, channels: 3 } }).png().toFile(join(folder, n));
  }
}

function digest(folder: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const n of readdirSync(folder).sort()) out[n] = createHash('sha256').update(readFileSync(join(folder, n))).digest('hex');
  return out;
}

function partials(folder: string): string[] {
  return existsSync(folder) ? readdirSync(folder).filter((n) => n.includes('partial')) : [];
}

describe('the input-folder guard looks where each input really lives', () => {
  it('a folder of links into the output folder is refused, and the frames they point at are untouched', async () => {
    const show = join(dir, 'show');
    await frames(show, ['a.png', 'b.png']);
    const playlist = join(dir, 'playlist');
    mkdirSync(playlist);
    symlinkSync(join(show, 'a.png'), join(playlist, 'a.png'));
    symlinkSync('../show/b.png', join(playlist, 'b.png'));
    const before = digest(show);
    const r = await runCli('warp', rig, playlist, '-o', show, '--jobs', '1');
    const line = userErrorLine(r, show);
    expect(line, r.stderr).toMatch(/is the folder of the input .*a\.png \(it links to .*show\/a\.png\); write the warped frames to another folder/);
    expect(digest(show)).toEqual(before);
  });

  it('a single linked file is caught the same way', async () => {
    const show = join(dir, 'show1');
    await frames(show, ['c.png']);
    const link = join(dir, 'c-link.png');
    symlinkSync(join(show, 'c.png'), link);
    const before = digest(show);
    const r = await runCli('warp', rig, link, '-o', show, '--jobs', '1');
    expect(userErrorLine(r, show), r.stderr).toMatch(/it links to/);
    expect(digest(show)).toEqual(before);
  });
});

describe('only regular files are frames', () => {
  it('a FIFO among the inputs is refused up front, named, and nothing is written', async () => {
    const show = join(dir, 'fifo-show');
    await frames(show, ['a.png']);
    try {
      execFileSync('mkfifo', [join(show, 'fifo.png')]);
    } catch {
      console.warn('skipped: no mkfifo on this machine');
      return;
    }
    const out = join(dir, 'fifo-out');
    const r = await runCli('warp', rig, show, '-o', out, '--jobs', '2');
    expect(userErrorLine(r, 'fifo.png'), r.stderr).toMatch(/fifo\.png: not a regular file/);
    expect(existsSync(out)).toBe(false);
  });
});

describe('a failure while finishing a frame fails that frame; the run ends with its summary', () => {
  it.each([['1'], ['2']])('--jobs %s with a run log that cannot be written: exit 1, every frame failed, no temporaries', async (jobs) => {
    const show = join(dir, `log-show-${jobs}`);
    await frames(show, ['f1.png', 'f2.png', 'f3.png']);
    const out = join(dir, `log-out-${jobs}`);
    mkdirSync(join(out, '.skyfold-warp.jsonl'), { recursive: true }); // appending to it fails (EISDIR)
    const r = await runCli('warp', rig, show, '-o', out, '--jobs', jobs, '--json');
    expect(r.code, r.stderr).toBe(1);
    const summary = JSON.parse(r.stdout);
    expect(summary.failed).toBe(3);
    expect(summary.failures[0].reason).toMatch(/run log could not record it/);
    expect(r.stderr).not.toMatch(/internal error/);
    expect(partials(out)).toEqual([]);
  });
});

describe('names skyfold writes are never followed', () => {
  it('a run log that is a symbolic link is refused before any frame, and its target is untouched', async () => {
    const show = join(dir, 'link-log-show');
    await frames(show, ['g.png']);
    const out = join(dir, 'link-log-out');
    mkdirSync(out);
    const victim = join(dir, 'victim.txt');
    writeFileSync(victim, 'precious\n');
    symlinkSync(victim, join(out, '.skyfold-warp.jsonl'));
    const r = await runCli('warp', rig, show, '-o', out, '--jobs', '1');
    expect(userErrorLine(r, '.skyfold-warp.jsonl'), r.stderr).toMatch(/symbolic link/);
    expect(readFileSync(victim, 'utf8')).toBe('precious\n');
    expect(existsSync(join(out, 'g.png'))).toBe(false);
  });

  it('bake -o onto a link replaces the link with the file; the link target is untouched', async () => {
    const victim = join(dir, 'victim2.txt');
    writeFileSync(victim, 'precious\n');
    const out = join(dir, 'mesh-link.csv');
    symlinkSync(victim, out);
    const r = await runCli('bake', rig, '-o', out, '--grid', '17x11');
    expect(r.code, r.stderr).toBe(0);
    expect(readFileSync(victim, 'utf8')).toBe('precious\n');
    expect(readFileSync(out, 'utf8')).toMatch(/\d/);
  });
});

describe('temporaries of a killed bake are cleaned up', () => {
  it('the next bake to the same file removes them (their process is gone), and leaves a live one alone', async () => {
    const folder = join(dir, 'stale');
    mkdirSync(folder);
    const dead = spawnSync(process.execPath, ['-e', '0']).pid; // a process that has certainly ended
    const host = (await import('node:os')).hostname().replace(/[^A-Za-z0-9]/g, '');
    const old = join(folder, `.mesh.csv.${dead}.partial`); // the name before hosts and random letters
    const recent = join(folder, `.mesh.csv.${host}.${dead}.0a1b2c3d4e5f.partial`);
    const live = join(folder, `.mesh.csv.${host}.${process.pid}.ffffffffffff.partial`);
    for (const f of [old, recent, live]) writeFileSync(f, 'half a mesh');
    const r = await runCli('bake', rig, '-o', join(folder, 'mesh.csv'), '--grid', '17x11');
    expect(r.code, r.stderr).toBe(0);
    expect(existsSync(old)).toBe(false);
    expect(existsSync(recent)).toBe(false);
    expect(existsSync(live)).toBe(true);
  });
});

describe('a full disk (a 256 kB tmpfs)', () => {
  const mnt = join(tmpdir(), `skyfold-full-${process.pid}`);
  let mounted = false;
  beforeAll(() => {
    mkdirSync(mnt, { recursive: true });
    try {
      execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=256k', 'tmpfs', mnt], { stdio: 'ignore' });
      mounted = true;
    } catch {
      console.warn('skipped the full-disk tests: mounting a tmpfs needs root');
    }
  });
  afterAll(() => {
    if (mounted) execFileSync('umount', [mnt]);
    rmSync(mnt, { recursive: true, force: true });
  });

  it('warp: frames that do not fit fail (exit 1), the run ends, no temporary is left', async () => {
    if (!mounted) return;
    const show = join(dir, 'full-show');
    // noisy frames compress badly: a few of them fill 256 kB
    mkdirSync(show);
    for (let i = 0; i < 6; i++) {
      const data = Buffer.from(Array.from({ length: 64 * 64 * 3 }, (_, k) => (k * 2654435761 + i * 97) % 251));
      await sharp(data, { raw: { width: 64, height: 64, channels: 3 } }).png().toFile(join(show, `n${i}.png`));
    }
    writeFileSync(join(mnt, 'filler'), Buffer.alloc(200 * 1024, 1));
    const out = join(mnt, 'out');
    const r = await runCli('warp', rig, show, '-o', out, '--jobs', '2', '--format', 'tiff', '--json');
    expect([1, 2], r.stderr).toContain(r.code);
    if (r.code === 1) expect(JSON.parse(r.stdout).failed).toBeGreaterThan(0);
    expect(r.stderr).not.toMatch(/internal error/);
    expect(partials(out)).toEqual([]);
  });

  it('bake: a mesh that does not fit is exit 2 naming the file, no temporary left', async () => {
    if (!mounted) return;
    const out = join(mnt, 'mesh.obj');
    const r = await runCli('bake', rig, '-o', out, '--grid', '97x61');
    expect(userErrorLine(r, out), r.stderr).toMatch(/cannot write/);
    expect(partials(mnt)).toEqual([]);
  });
});
