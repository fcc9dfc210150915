/** The steps of a frame batch, one at a time: the size vote, the settings key, the pending jobs, the output folder. */
import { mkdirSync, mkdtempSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expandInputs } from '../src/warp/inputs.js';
import { Manifest } from '../src/warp/manifest.js';
import { prepareOutputFolder } from '../src/warp/output-folder.js';
import { pendingJobs, settingsKey } from '../src/warp/pending.js';
import { voteSourceSize } from '../src/warp/size-vote.js';

const dir = mkdtempSync(join(tmpdir(), 'skyfold-batch-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const png = (path: string, w: number, h: number) => sharp({ create: { width: w, height: h, channels: 3, background: '#000' } }).png().toFile(path);

beforeAll(async () => {
  mkdirSync(join(dir, 'show'));
  await png(join(dir, 'show', 'f_1.png'), 40, 40);
  await png(join(dir, 'show', 'f_2.png'), 64, 64);
  await png(join(dir, 'show', 'f_3.png'), 64, 64);
  writeFileSync(join(dir, 'show', 'f_4.png'), 'not a picture');
});

describe('voteSourceSize', () => {
  it('takes the most common header size; an odd first frame and an unreadable one do not decide it', async () => {
    expect(await voteSourceSize(['f_1', 'f_2', 'f_3', 'f_4'].map((n) => join(dir, 'show', `${n}.png`)))).toEqual([64, 64]);
  });

  it('gives nothing when no header can be read', async () => {
    expect(await voteSourceSize([join(dir, 'show', 'f_4.png')])).toBeUndefined();
  });
});

describe('settingsKey', () => {
  const mapSettings = { brightness: 1, brightnessFloor: 0.1, feather: 2, flip: false, rotate: 0 as const };
  const out = { filter: 'area' as const };
  it('is the same for the same settings and changes with each of them', () => {
    const key = settingsKey('rig-a', mapSettings, out);
    expect(settingsKey('rig-a', { ...mapSettings }, { ...out })).toBe(key);
    const changed = [
      settingsKey('rig-b', mapSettings, out),
      settingsKey('rig-a', { ...mapSettings, brightness: 0.5 }, out),
      settingsKey('rig-a', { ...mapSettings, feather: 3 }, out),
      settingsKey('rig-a', { ...mapSettings, rotate: 90 }, out),
      settingsKey('rig-a', mapSettings, { filter: 'bilinear' }),
      settingsKey('rig-a', mapSettings, { ...out, format: 'jpeg' }),
      settingsKey('rig-a', mapSettings, { ...out, quality: 80 }),
    ];
    expect(new Set([key, ...changed]).size).toBe(changed.length + 1);
  });
});

describe('pendingJobs', () => {
  it('leaves out frames the run log lists as done under the same key, unless told to overwrite', async () => {
    const outDir = prepareOutputFolder(join(dir, 'out'), []);
    const frames = expandInputs([join(dir, 'show')]);
    const manifest = new Manifest(outDir);
    const first = pendingJobs(frames, outDir, manifest, 'k1', { tag: '.tag-' });
    expect(first.skipped).toBe(0);
    expect(first.jobs.map((j) => j.output)).toEqual(['f_1', 'f_2', 'f_3', 'f_4'].map((n) => join(outDir, `${n}.png`)));
    expect(first.jobs.every((j) => j.temp.startsWith(join(outDir, '.')) && j.temp.includes('.tag-'))).toBe(true);
    await png(join(outDir, 'f_2.png'), 8, 8); // isDone also wants the output to exist
    manifest.record('f_2.png', first.jobs[1].input, 'k1');
    expect(pendingJobs(frames, outDir, manifest, 'k1', { tag: '.tag-' })).toMatchObject({ skipped: 1 });
    expect(pendingJobs(frames, outDir, manifest, 'k2', { tag: '.tag-' })).toMatchObject({ skipped: 0 });
    expect(pendingJobs(frames, outDir, manifest, 'k1', { tag: '.tag-', overwrite: true })).toMatchObject({ skipped: 0 });
    expect(pendingJobs(frames, outDir, manifest, 'k1', { tag: '.tag-', format: 'jpeg' }).jobs[0].output).toBe(join(outDir, 'f_1.jpg'));
  });
});

describe('prepareOutputFolder', () => {
  it('refuses a file, and the folder of an input under another name', () => {
    writeFileSync(join(dir, 'a-file'), '');
    expect(() => prepareOutputFolder(join(dir, 'a-file'), [])).toThrow(`${join(dir, 'a-file')}: cannot create the output folder: EEXIST`);
    symlinkSync(join(dir, 'show'), join(dir, 'alias'), 'dir');
    expect(() => prepareOutputFolder(join(dir, 'alias'), expandInputs([join(dir, 'show', 'f_2.png')]))).toThrow(
      `${join(dir, 'alias')}: is the folder of the input ${join(dir, 'show', 'f_2.png')}; write the warped frames to another folder`,
    );
  });
});
