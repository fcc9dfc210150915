/**
 * `skyfold warp` as a user runs it, on small frames in temporary folders: in-process, except where only
 * a process will do (signals, a kill, shards run at once, a shell pipe), which spawn the real binary.
 * A 480 × 300 copy of the demo rig and 512² dome masters keep each run well under a second.
 */
import { spawn, spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { crc32, deflateSync } from 'node:zlib';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { BAKE_DEFAULTS, REMAP_DEFAULTS, createImageLike, pixelMapFromRig, remap, smoothCard, starField, type ImageBuffer, type RemapMap } from '@skyfold/warp-core';
import { loadRig, type BatchSummary } from '@skyfold/warp-cli';
import { BIN, ROOT, collect, demoRigText, skyfold as runSkyfold, spawnSkyfold, tempDir, whileRunning, type Run } from './support.js';

const MANIFEST = '.skyfold-warp.jsonl';
const PROJ: [number, number] = [480, 300];
/** Tests of the spawned binary on a busy shared machine: a generous limit for the whole test, not a speed check. */
const SPAWNED_TIMEOUT = 300_000;

/** skyfold in-process, in `cwd`, with `input` on standard input. */
function skyfold(args: string[], cwd: string, input?: Buffer): Promise<Run> {
  return runSkyfold(args, { cwd, input });
}

function summaryOf(r: Run): BatchSummary {
  try {
    return JSON.parse(r.stdout.toString()) as BatchSummary;
  } catch {
    throw new Error(`no JSON summary (exit ${r.code}); stderr: ${r.stderr}`);
  }
}

async function writePng(path: string, img: ImageBuffer): Promise<void> {
  let s = sharp(img.data, { raw: { width: img.width, height: img.height, channels: img.channels } });
  if (img.data instanceof Uint16Array) s = s.toColorspace(img.channels <= 2 ? 'grey16' : 'rgb16');
  await s.png().toFile(path);
}

/** Every file of an output folder must be a finished output or the run log: no temporary or partial files. */
function strayFiles(dir: string): string[] {
  return readdirSync(dir).filter((n) => n !== MANIFEST && n.startsWith('.'));
}

function outputs(dir: string): string[] {
  return readdirSync(dir)
    .filter((n) => !n.startsWith('.'))
    .sort();
}

/** Decodes the whole image, failing on truncation (a half-written file). */
async function decodesFully(path: string): Promise<boolean> {
  try {
    const { info } = await sharp(path, { failOn: 'truncated' }).raw().toBuffer({ resolveWithObject: true });
    return info.width === PROJ[0] && info.height === PROJ[1];
  } catch {
    return false;
  }
}

const work = tempDir('warp-cli');
let rig: string;

/** A folder of `count` distinct star-field dome masters named `${prefix}${i}.png`. */
async function frameFolder(name: string, count: number, size = 512, prefix = 'frame_', pad = 0): Promise<string> {
  const dir = join(work, name);
  mkdirSync(dir, { recursive: true });
  for (let i = 1; i <= count; i++) {
    await writePng(join(dir, `${prefix}${String(i).padStart(pad, '0')}.png`), starField(size, { count: 150, seed: 11, turnDeg: 7 * i }));
  }
  return dir;
}

const made = new Map<string, Promise<string>>();
/** Shared, read-only input folders, made once: `show7` (7 frames, 512²) and `show12` (12 frames, 768², slow enough to interrupt). */
function show(which: 'show7' | 'show12'): Promise<string> {
  if (!made.has(which)) made.set(which, which === 'show7' ? frameFolder('show7', 7) : frameFolder('show12', 12, 768));
  return made.get(which)!;
}

/** A private copy of the first `count` frames of show7, to damage or edit. */
async function copyOfShow(name: string, count: number): Promise<string> {
  const src = await show('show7');
  const dir = join(work, name);
  mkdirSync(dir);
  for (let i = 1; i <= count; i++) copyFileSync(join(src, `frame_${i}.png`), join(dir, `frame_${i}.png`));
  return dir;
}

beforeAll(() => {
  if (!existsSync(join(ROOT, 'packages', 'warp-cli', 'dist', 'main.js'))) throw new Error('build first: npx tsc -b');
  rig = join(work, 'rig.yaml');
  writeFileSync(rig, demoRigText(PROJ));
});

describe('skyfold warp: folders, names and formats', () => {
  it('warps a folder; outputs keep the base names and other files are left out', async () => {
    const dir = join(work, 'names');
    mkdirSync(dir);
    const names = ['shot_2', 'shot_10', 'shot_1'];
    for (const [i, n] of names.entries()) await writePng(join(dir, `${n}.png`), starField(512, { count: 100, turnDeg: 10 * i }));
    writeFileSync(join(dir, 'notes.txt'), 'not a frame');
    const r = await skyfold(['warp', rig, dir, '-o', join(work, 'names-out'), '--json', '--jobs', '1'], work);
    expect(r.code, r.stderr).toBe(0);
    expect(summaryOf(r)).toMatchObject({ done: 3, skipped: 0, failed: 0, failures: [], total: 3 });
    expect(outputs(join(work, 'names-out'))).toEqual(['shot_1.png', 'shot_10.png', 'shot_2.png']);
    for (const n of outputs(join(work, 'names-out'))) expect(await decodesFully(join(work, 'names-out', n))).toBe(true);
    expect(strayFiles(join(work, 'names-out'))).toEqual([]);
  });

  it('16-bit PNG in gives 16-bit PNG (and TIFF) out; --format jpeg gives 8-bit .jpg; alpha and grey are kept', async () => {
    const dir = join(work, 'deep');
    mkdirSync(dir);
    await writePng(join(dir, 'deep.png'), smoothCard(512, true));
    const rgba = smoothCard(512);
    const withAlpha = new Uint8Array(512 * 512 * 4);
    for (let k = 0; k < 512 * 512; k++) {
      withAlpha.set(rgba.data.subarray(k * 3, k * 3 + 3), k * 4);
      withAlpha[k * 4 + 3] = 200;
    }
    await writePng(join(dir, 'alpha.png'), { width: 512, height: 512, channels: 4, data: withAlpha });
    const deep = smoothCard(512, true).data;
    const grey16 = new Uint16Array(512 * 512).map((_, k) => deep[3 * k + 1]);
    await writePng(join(dir, 'grey16.png'), { width: 512, height: 512, channels: 1, data: grey16 });

    const png = await skyfold(['warp', rig, dir, '-o', join(work, 'deep-png'), '--json', '--jobs', '1'], work);
    expect(png.code, png.stderr).toBe(0);
    const m16 = await sharp(join(work, 'deep-png', 'deep.png')).metadata();
    expect([m16.format, m16.depth, m16.width, m16.height]).toEqual(['png', 'ushort', PROJ[0], PROJ[1]]);
    // genuinely 16-bit samples, not 8-bit values stretched by 257
    const { data } = await sharp(join(work, 'deep-png', 'deep.png')).raw({ depth: 'ushort' }).toBuffer({ resolveWithObject: true });
    const s16 = new Uint16Array(data.buffer, data.byteOffset, data.byteLength / 2);
    let fine = 0;
    for (const v of s16) if (v % 257 !== 0) fine++;
    expect(fine).toBeGreaterThan(s16.length / 10);
    const ma = await sharp(join(work, 'deep-png', 'alpha.png')).metadata();
    expect([ma.channels, ma.hasAlpha, ma.depth]).toEqual([4, true, 'uchar']);
    const mg = await sharp(join(work, 'deep-png', 'grey16.png')).metadata();
    expect([mg.channels, mg.depth]).toEqual([1, 'ushort']);

    const tif = await skyfold(['warp', rig, join(dir, 'deep.png'), '-o', join(work, 'deep-tif'), '--format', 'tiff', '--json', '--jobs', '1'], work);
    expect(tif.code, tif.stderr).toBe(0);
    expect(outputs(join(work, 'deep-tif'))).toEqual(['deep.tif']);
    const mt = await sharp(join(work, 'deep-tif', 'deep.tif')).metadata();
    expect([mt.format, mt.depth]).toEqual(['tiff', 'ushort']);

    const jpg = await skyfold(['warp', rig, join(dir, 'deep.png'), '-o', join(work, 'deep-jpg'), '--format', 'jpeg', '--quality', '90', '--json', '--jobs', '1'], work);
    expect(jpg.code, jpg.stderr).toBe(0);
    expect(outputs(join(work, 'deep-jpg'))).toEqual(['deep.jpg']);
    const mj = await sharp(join(work, 'deep-jpg', 'deep.jpg')).metadata();
    expect([mj.format, mj.depth, mj.width, mj.height]).toEqual(['jpeg', 'uchar', PROJ[0], PROJ[1]]);
  });

  it('--frames 3-5 warps only those frame numbers', async () => {
    const dir = await show('show7');
    const r = await skyfold(['warp', rig, dir, '-o', join(work, 'range-out'), '--frames', '3-5', '--json', '--jobs', '1'], work);
    expect(r.code, r.stderr).toBe(0);
    expect(summaryOf(r)).toMatchObject({ done: 3, total: 3, failed: 0 });
    expect(outputs(join(work, 'range-out'))).toEqual(['frame_3.png', 'frame_4.png', 'frame_5.png']);
  });

  it('expands a numbered sequence frame_%04d.png, ignoring files that do not match', async () => {
    const dir = await frameFolder('seq', 4, 512, 'frame_', 4);
    copyFileSync(join(dir, 'frame_0001.png'), join(dir, 'frame_01.png')); // too few digits for %04d
    copyFileSync(join(dir, 'frame_0001.png'), join(dir, 'other_0001.png'));
    const r = await skyfold(['warp', rig, join(dir, 'frame_%04d.png'), '-o', join(work, 'seq-out'), '--frames', '2-4', '--json', '--jobs', '1'], work);
    expect(r.code, r.stderr).toBe(0);
    expect(summaryOf(r)).toMatchObject({ done: 3, total: 3 });
    expect(outputs(join(work, 'seq-out'))).toEqual(['frame_0002.png', 'frame_0003.png', 'frame_0004.png']);
  });
});

describe('skyfold warp: bad frames and refusals', () => {
  it('reports and skips a truncated PNG, a text file named .png and a wrong-sized frame; warps the rest; exit 1', async () => {
    const dir = await copyOfShow('bad', 6);
    const good = readFileSync(join(dir, 'frame_3.png'));
    writeFileSync(join(dir, 'frame_3.png'), good.subarray(0, Math.floor(good.length / 2)));
    writeFileSync(join(dir, 'frame_4.png'), 'this is a text file, not a picture\n');
    await writePng(join(dir, 'frame_5.png'), starField(256, { count: 50 }));
    const r = await skyfold(['warp', rig, dir, '-o', join(work, 'bad-out'), '--json'], work);
    expect(r.code, r.stderr).toBe(1);
    const s = summaryOf(r);
    expect(s).toMatchObject({ done: 3, skipped: 0, failed: 3, total: 6 });
    const reasons = Object.fromEntries(s.failures.map((f) => [f.input.split(/[\\/]/).pop(), f.reason]));
    expect(Object.keys(reasons).sort()).toEqual(['frame_3.png', 'frame_4.png', 'frame_5.png']);
    expect(reasons['frame_3.png']).toMatch(/^unreadable image/);
    expect(reasons['frame_4.png']).toMatch(/^unreadable image/);
    expect(reasons['frame_5.png']).toBe('wrong size: 256x256, expected 512x512 like the first frame');
    expect(outputs(join(work, 'bad-out'))).toEqual(['frame_1.png', 'frame_2.png', 'frame_6.png']);
    expect(strayFiles(join(work, 'bad-out'))).toEqual([]);
  });

  it('one odd-sized frame at the head of the show does not fail all the others', async () => {
    // issue 4: "an unreadable, truncated or wrong-sized frame is reported and skipped; the rest are warped"
    const dir = await copyOfShow('odd-first', 3);
    await writePng(join(dir, 'frame_0.png'), starField(256, { count: 50 }));
    const r = await skyfold(['warp', rig, dir, '-o', join(work, 'odd-first-out'), '--json', '--jobs', '1'], work);
    const s = summaryOf(r);
    expect(s.failures.map((f) => f.input.split(/[\\/]/).pop())).toEqual(['frame_0.png']);
    expect(s).toMatchObject({ done: 3, failed: 1 });
    expect(r.code).toBe(1);
  });

  it('--max-pixels refuses frames over the cap with a clear reason', async () => {
    const dir = await show('show7');
    const r = await skyfold(['warp', rig, dir, '-o', join(work, 'cap-out'), '--frames', '1-2', '--max-pixels', '100000', '--json', '--jobs', '1'], work);
    expect(r.code, r.stderr).toBe(1);
    const s = summaryOf(r);
    expect(s).toMatchObject({ done: 0, failed: 2, total: 2 });
    for (const f of s.failures) expect(f.reason).toBe('image is 512x512 (262144 pixels), over the limit of 100000 pixels (raise it with --max-pixels)');
    expect(outputs(join(work, 'cap-out'))).toEqual([]);
  });

  it('refuses a PNG whose header claims a huge size (the default cap), and warps the rest', async () => {
    const dir = await copyOfShow('bomb', 3);
    // a valid PNG claiming 20000 × 20000 RGB (400 megapixels) with a few bytes of image data
    const chunk = (type: string, body: Buffer) => {
      const len = Buffer.alloc(4);
      len.writeUInt32BE(body.length);
      const tb = Buffer.concat([Buffer.from(type, 'ascii'), body]);
      const crc = Buffer.alloc(4);
      crc.writeUInt32BE(crc32(tb));
      return Buffer.concat([len, tb, crc]);
    };
    const ihdr = Buffer.alloc(13);
    ihdr.writeUInt32BE(20000, 0);
    ihdr.writeUInt32BE(20000, 4);
    ihdr.set([8, 2, 0, 0, 0], 8);
    writeFileSync(join(dir, 'frame_2.png'), Buffer.concat([Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]), chunk('IHDR', ihdr), chunk('IDAT', deflateSync(Buffer.alloc(64))), chunk('IEND', Buffer.alloc(0))]));
    const r = await skyfold(['warp', rig, dir, '-o', join(work, 'bomb-out'), '--json', '--jobs', '1'], work);
    expect(r.code, r.stderr).toBe(1);
    const s = summaryOf(r);
    expect(s).toMatchObject({ done: 2, failed: 1 });
    expect(s.failures[0].reason).toMatch(/^image is 20000x20000 \(400000000 pixels\), over the limit of \d+ pixels/);
  });

  it('refuses to write into the input folder (exit 2, one line, nothing written)', async () => {
    const dir = await show('show7');
    const before = readdirSync(dir).sort();
    for (const out of [dir, 'show7/']) {
      const r = await skyfold(['warp', rig, dir, '-o', out], work);
      expect(r.code).toBe(2);
      expect(r.stderr.trimEnd().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(/^skyfold: .*is the folder of the input .*frame_1\.png; write the warped frames to another folder\n$/);
      expect(readdirSync(dir).sort()).toEqual(before);
    }
    // one input file from the output folder among others is enough to refuse
    const other = await frameFolder('refuse-other', 1, 512, 'x_');
    const r = await skyfold(['warp', rig, join(other, 'x_1.png'), join(dir, 'frame_2.png'), '-o', dir], work);
    expect(r.stderr).toMatch(/frame_2\.png; write the warped frames to another folder/);
    expect(r.code).toBe(2);
    expect(readdirSync(dir).sort()).toEqual(before);
  });

  it('refuses an output folder that is the input folder under another name (a symlink), leaving the frames intact', async () => {
    const dir = await copyOfShow('linked', 2);
    const link = join(work, 'linked-alias');
    symlinkSync(dir, link, 'dir');
    const before = readFileSync(join(dir, 'frame_1.png'));
    const r = await skyfold(['warp', rig, dir, '-o', link, '--json', '--jobs', '1'], work);
    // the outputs keep the inputs' names: writing there replaces the show's own frames with warped ones
    expect(readFileSync(join(dir, 'frame_1.png')).equals(before), 'the input frame_1.png was overwritten by its warped output').toBe(true);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^skyfold: .*write the warped frames to another folder\n$/);
  });
});

describe('skyfold warp: crash safety and resume', () => {
  it('a run killed with SIGKILL leaves only complete frames; the rerun finishes only what is missing', async () => {
    const dir = await show('show12');
    const out = join(work, 'kill-out');
    // the real binary, spawned: only a process can be killed
    const { child, done: closed } = spawnSkyfold(['warp', rig, dir, '-o', out, '--jobs', '1', '--json'], { cwd: work });
    const seen = await whileRunning(child, () => existsSync(out) && outputs(out).length >= 2);
    child.kill('SIGKILL');
    const killed = await closed;
    expect(seen, `no outputs appeared; stderr: ${killed.stderr}`).toBe(true);
    expect(killed.signal).toBe('SIGKILL');
    const present = outputs(out);
    expect(present.length, 'the run finished before it could be killed: use slower frames').toBeLessThan(12);
    for (const n of present) expect(await decodesFully(join(out, n)), `${n} is half-written`).toBe(true);
    const kept = new Map(present.map((n) => [n, readFileSync(join(out, n))]));

    const r = await skyfold(['warp', rig, dir, '-o', out, '--jobs', '1', '--json'], work);
    expect(r.code, r.stderr).toBe(0);
    const s = summaryOf(r);
    expect(s.skipped).toBeGreaterThan(0);
    expect(s.skipped).toBeLessThanOrEqual(present.length);
    expect(s.done + s.skipped).toBe(12);
    expect(s.failed).toBe(0);
    expect(outputs(out)).toEqual(Array.from({ length: 12 }, (_, i) => `frame_${i + 1}.png`).sort());
    for (const n of outputs(out)) expect(await decodesFully(join(out, n))).toBe(true);
    for (const [n, bytes] of kept) expect(readFileSync(join(out, n)).equals(bytes), `${n} changed`).toBe(true);
    expect(strayFiles(out)).toEqual([]);
  }, SPAWNED_TIMEOUT);

  for (const jobs of ['1', '2']) {
    it(`SIGINT (--jobs ${jobs}) stops with exit 130 and leaves only complete frames, no temporary files`, async () => {
      const dir = await show('show12');
      const out = join(work, `int${jobs}-out`);
      // the real binary, spawned: the signal goes to a process of its own
      const { child, done: closed } = spawnSkyfold(['warp', rig, dir, '-o', out, '--jobs', jobs], { cwd: work });
      expect(await whileRunning(child, () => existsSync(out) && outputs(out).length >= 1)).toBe(true);
      child.kill('SIGINT');
      const r = await closed;
      expect(r.code, r.stderr).toBe(130);
      expect(r.stderr).toMatch(/stopped/);
      expect(strayFiles(out)).toEqual([]);
      const present = outputs(out);
      expect(present.length).toBeLessThan(12);
      for (const n of present) expect(await decodesFully(join(out, n))).toBe(true);

      if (jobs === '2') return; // resuming is the same for both; one rerun is enough
      const again = await skyfold(['warp', rig, dir, '-o', out, '--jobs', jobs, '--json'], work);
      expect(again.code, again.stderr).toBe(0);
      const s = summaryOf(again);
      expect(s.skipped).toBeGreaterThan(0);
      expect(s.done + s.skipped).toBe(12);
      expect(outputs(out)).toHaveLength(12);
    }, SPAWNED_TIMEOUT);
  }

  it('a rerun redoes the frames whose input changed or output is gone, and all frames when a setting or the rig changed', async () => {
    const dir = await copyOfShow('change', 3);
    const out = join(work, 'change-out');
    const first = await skyfold(['warp', rig, dir, '-o', out, '--json', '--jobs', '1'], work);
    expect(summaryOf(first)).toMatchObject({ done: 3, skipped: 0 });

    const before = readFileSync(join(out, 'frame_2.png'));
    await writePng(join(dir, 'frame_2.png'), smoothCard(512));
    rmSync(join(out, 'frame_3.png')); // an output deleted by hand is redone too
    const edited = await skyfold(['warp', rig, dir, '-o', out, '--json', '--jobs', '1'], work);
    expect(summaryOf(edited)).toMatchObject({ done: 2, skipped: 1 });
    expect(outputs(out)).toEqual(['frame_1.png', 'frame_2.png', 'frame_3.png']);
    expect(readFileSync(join(out, 'frame_2.png')).equals(before)).toBe(false);

    const setting = await skyfold(['warp', rig, dir, '-o', out, '--brightness', '0.5', '--json', '--jobs', '1'], work);
    expect(summaryOf(setting)).toMatchObject({ done: 3, skipped: 0 });

    // the rig itself is a setting too
    const moved = join(work, 'rig-moved.yaml');
    writeFileSync(moved, readFileSync(rig, 'utf8').replace(/roll:\s*0\b/, 'roll: 1'));
    const rerig = await skyfold(['warp', moved, dir, '-o', out, '--brightness', '0.5', '--json', '--jobs', '1'], work);
    expect(summaryOf(rerig)).toMatchObject({ done: 3, skipped: 0 });
    expect(strayFiles(out)).toEqual([]);
  });

  it('shards 1/3, 2/3 and 3/3, run at once into one folder, give exactly the outputs of a single run', async () => {
    const dir = await show('show7');
    const single = join(work, 'shard-single');
    const one = await skyfold(['warp', rig, dir, '-o', single, '--json'], work);
    expect(one.code, one.stderr).toBe(0);
    const shared = join(work, 'shard-shared');
    // three processes at once, as three machines would run them: the real binary, spawned
    const runs = await Promise.all(['1/3', '2/3', '3/3'].map((k) => spawnSkyfold(['warp', rig, dir, '-o', shared, '--shard', k, '--jobs', '1', '--json'], { cwd: work }).done));
    for (const r of runs) expect(r.code, r.stderr).toBe(0);
    expect(runs.map((r) => summaryOf(r).done)).toEqual([3, 2, 2]);
    expect(outputs(shared)).toEqual(outputs(single));
    for (const n of outputs(single)) expect(readFileSync(join(shared, n)).equals(readFileSync(join(single, n))), n).toBe(true);
  }, SPAWNED_TIMEOUT);
});

describe('skyfold warp --raw-in: raw video pipes', () => {
  const hasFfmpeg = spawnSync('ffmpeg', ['-version']).status === 0 && spawnSync('ffprobe', ['-version']).status === 0;

  let map: RemapMap | undefined;
  function libraryWarp(src: ImageBuffer): Buffer {
    // what `warp --raw-in` promises: the default filter and brightness settings of a rig warp
    map ??= pixelMapFromRig(loadRig(rig).rig, [src.width, src.height], {
      brightness: BAKE_DEFAULTS.brightness,
      brightnessFloor: BAKE_DEFAULTS.brightnessFloor,
      feather: BAKE_DEFAULTS.feather,
    });
    const out = remap(src, map, { filter: REMAP_DEFAULTS.filter, out: createImageLike(src, map.width, map.height) });
    return Buffer.from(out.data.buffer, out.data.byteOffset, out.data.byteLength);
  }

  it('rgb24 and rgb48le frames on stdin come out as the library remap of each frame', async () => {
    const a = smoothCard(256);
    const b = starField(256, { count: 80 });
    const bytes = (img: ImageBuffer) => Buffer.from(img.data.buffer, img.data.byteOffset, img.data.byteLength);
    const r8 = await skyfold(['warp', rig, '--raw-in', '256x256'], work, Buffer.concat([bytes(a), bytes(b)]));
    expect(r8.code, r8.stderr).toBe(0);
    const frame = PROJ[0] * PROJ[1] * 3;
    expect(r8.stdoutBytes.length).toBe(2 * frame);
    expect(r8.stdoutBytes.subarray(0, frame).equals(libraryWarp(a))).toBe(true);
    expect(r8.stdoutBytes.subarray(frame).equals(libraryWarp(b))).toBe(true);

    const deep = smoothCard(256, true); // Uint16Array: little-endian bytes on the hosts we run on
    const r16 = await skyfold(['warp', rig, '--raw-in', '256x256:rgb48le'], work, bytes(deep));
    expect(r16.code, r16.stderr).toBe(0);
    expect(r16.stdoutBytes.length).toBe(2 * frame);
    expect(r16.stdoutBytes.equals(libraryWarp(deep))).toBe(true);
  });

  it('a stream that ends inside a frame is an error (exit 2, one line)', async () => {
    const r = await skyfold(['warp', rig, '--raw-in', '256x256'], work, Buffer.alloc(256 * 256 * 3 + 10));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^skyfold: --raw-in: standard input ended inside a frame \(10 of 196608 bytes\)\n$/m);
  });

  if (!hasFfmpeg) console.warn('skyfold warp --raw-in with ffmpeg: SKIPPED, ffmpeg/ffprobe are not on PATH (Debian: apt-get install ffmpeg)');
  it.skipIf(!hasFfmpeg)(`sits between two ffmpeg processes${hasFfmpeg ? '' : ' (SKIPPED: no ffmpeg/ffprobe on PATH)'}`, async () => {
    const out = join(work, 'pipe.nut');
    const script = [
      'set -o pipefail',
      'ffmpeg -hide_banner -loglevel error -f lavfi -i testsrc=size=256x256:rate=10 -frames:v 4 -f rawvideo -pix_fmt rgb24 - |',
      `"${BIN}" warp "${rig}" --raw-in 256x256 |`,
      `ffmpeg -hide_banner -loglevel error -f rawvideo -pix_fmt rgb24 -s ${PROJ[0]}x${PROJ[1]} -r 10 -i - -c:v rawvideo -y "${out}"`,
    ].join('\n');
    const r = await collect(spawn('bash', ['-c', script], { cwd: work, env: { ...process.env, CI: 'true' } }));
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/warped 4 raw frames 256x256 -> 480x300 \(rgb24\)/);
    const probe = spawnSync('ffprobe', ['-v', 'error', '-count_frames', '-select_streams', 'v:0', '-show_entries', 'stream=width,height,nb_read_frames', '-of', 'json', out]);
    expect(probe.status, probe.stderr.toString()).toBe(0);
    const st = (JSON.parse(probe.stdout.toString()) as { streams: { width: number; height: number; nb_read_frames: string }[] }).streams[0];
    expect([st.width, st.height, Number(st.nb_read_frames)]).toEqual([PROJ[0], PROJ[1], 4]);
  });
});
