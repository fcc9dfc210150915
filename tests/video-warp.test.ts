/**
 * Video in, video out: probing, recognising a video, and warping it frame for frame. Tiny
 * synthetic videos (ffmpeg's lavfi testsrc) of a few frames keep each case to a second or two.
 * Every case is skipped, saying so, where ffmpeg is not installed.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { findVideoTools, firstOffGrid, probeVideo } from '@skyfold/warp-cli';
import { ffmpeg, frameTimes, partials, PROJ, setUpVideoWork, skyfold, streamField, testVideo as makeVideo, TOOLS } from './video-fixtures.js';

let work: string;
let rig: string;

beforeAll(() => {
  ({ work, rig } = setUpVideoWork('warp'));
});

const testVideo = (name: string, size: number | [number, number], rate: string, frames: number, extra: string[]) => makeVideo(work, name, size, rate, frames, extra);

describe('finding ffmpeg', () => {
  it('names how to install it when it is not on the PATH', () => {
    expect(() => findVideoTools(undefined, { PATH: join(tmpdir(), 'no-such-folder') })).toThrow(/apt-get install ffmpeg, brew install ffmpeg/);
  });

  it('refuses a SKYFOLD_FFMPEG that is not there, naming it', () => {
    expect(() => findVideoTools(undefined, { SKYFOLD_FFMPEG: '/no/such/ffmpeg', PATH: '' })).toThrow('SKYFOLD_FFMPEG /no/such/ffmpeg: no ffmpeg program there; install ffmpeg');
  });

  it.skipIf(!TOOLS)('a video input without ffmpeg exits 2 with the install hint', async () => {
    const video = testVideo('hint.mp4', 64, '25', 2, ['-c:v', 'libx264']);
    const r = await skyfold(['warp', rig, video, '-o', join(work, 'hint-out.mp4'), '--ffmpeg', join(work, 'nowhere', 'ffmpeg')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^skyfold: --ffmpeg .*nowhere\/ffmpeg: no ffmpeg program there; install ffmpeg \(apt-get install ffmpeg/);
    expect(existsSync(join(work, 'hint-out.mp4'))).toBe(false);
  });
});

describe('constant-rate grid', () => {
  // 30000/1001 fps in a millisecond time base (Matroska's default): ticks 0, 33, 67, 100, ... rounded
  const ntsc = { num: 30000, den: 1001 };
  const ms = { num: 1, den: 1000 };
  const ticks = Array.from({ length: 300 }, (_, i) => Math.round((i * 1001) / 30));
  it('accepts rounded millisecond timestamps', () => expect(firstOffGrid(ticks, ntsc, ms)).toBe(-1));
  it('finds the first frame after a gap', () => {
    const gap = ticks.map((t, i) => (i >= 120 ? t + 33 : t));
    expect(firstOffGrid(gap, ntsc, ms)).toBe(120);
  });
  it('finds a rate that drifts (29.97 frames labelled 30)', () => expect(firstOffGrid(ticks, { num: 30, den: 1 }, ms)).toBeGreaterThan(0));
});

describe.skipIf(!TOOLS)('probing', () => {
  it('reads size, exact rate, count, pixel format and colour', async () => {
    const path = testVideo('ntsc.mp4', 64, '30000/1001', 7, ['-c:v', 'libx264', '-pix_fmt', 'yuv420p', '-colorspace', 'bt709', '-color_primaries', 'bt709', '-color_trc', 'bt709', '-color_range', 'tv']);
    const info = await probeVideo(TOOLS!, path);
    expect(info).toMatchObject({ width: 64, height: 64, rate: { num: 30000, den: 1001 }, frameCount: 7, pixFmt: 'yuv420p', bitDepth: 8, rgb: false, rotation: 0, startTime: 0 });
    expect(info!.colour).toEqual({ range: 'tv', space: 'bt709', transfer: 'bt709', primaries: 'bt709' });
  });

  it('counts frames where the container keeps no count (Matroska), and reads the depth of a 10-bit source', async () => {
    const path = testVideo('deep.mkv', 48, '24', 5, ['-c:v', 'ffv1', '-pix_fmt', 'yuv420p10le']);
    expect(streamField(path, 'nb_frames')).toBe('N/A');
    const info = await probeVideo(TOOLS!, path);
    expect(info).toMatchObject({ frameCount: 5, rate: { num: 24, den: 1 }, bitDepth: 10, pixFmt: 'yuv420p10le' });
  });

  it('gives the rotation as the turn ffmpeg applies to show the picture, and the shown size', async () => {
    const coded = testVideo('coded.mov', [64, 32], '25', 2, ['-c:v', 'ffv1', '-pix_fmt', 'bgr0']);
    const turned = join(work, 'turned.mov');
    ffmpeg(['-i', coded, '-c', 'copy', '-metadata:s:v:0', 'rotate=90', turned]);
    const info = await probeVideo(TOOLS!, turned);
    expect([info!.width, info!.height]).toEqual([32, 64]);
    // turning the coded picture clockwise by info.rotation must give what ffmpeg shows
    const raw = (args: string[]) => spawnSync(TOOLS!.ffmpeg, ['-v', 'error', ...args, '-i', turned, '-frames:v', '1', '-f', 'rawvideo', '-pix_fmt', 'rgb24', '-'], { maxBuffer: 1 << 24 }).stdout;
    const plain = raw(['-noautorotate']);
    const shown = raw([]);
    const [w, h] = [64, 32];
    const rotated = Buffer.alloc(plain.length);
    const turns = info!.rotation / 90;
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        // clockwise quarter turns of a w×h picture; the result is h×w for odd turns
        const [nx, ny, nw] = turns === 1 ? [h - 1 - y, x, h] : turns === 3 ? [y, w - 1 - x, h] : turns === 2 ? [w - 1 - x, h - 1 - y, w] : [x, y, w];
        plain.copy(rotated, (ny * nw + nx) * 3, (y * w + x) * 3, (y * w + x) * 3 + 3);
      }
    }
    expect([90, 270]).toContain(info!.rotation);
    expect(rotated.equals(shown)).toBe(true);
  });

  it('says a still image is not a video', async () => {
    const png = join(work, 'still.png');
    ffmpeg(['-f', 'lavfi', '-i', 'testsrc=size=32x32', '-frames:v', '1', png]);
    expect(await probeVideo(TOOLS!, png)).toBeUndefined();
  });
});

describe.skipIf(!TOOLS)('warping a video', () => {
  it('keeps the frame count, the exact rate and every timestamp', async () => {
    const input = testVideo('show.mp4', 128, '30000/1001', 9, ['-c:v', 'libx264', '-pix_fmt', 'yuv420p']);
    const output = join(work, 'warped.mp4');
    const r = await skyfold(['warp', rig, input, '-o', output, '--json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const summary = JSON.parse(r.stdout);
    expect(summary).toMatchObject({ done: 9, total: 9, failed: 0, video: { size: [128, 128], projector: PROJ, rate: '30000/1001', codec: 'h264' } });
    expect(streamField(output, 'width')).toBe(String(PROJ[0]));
    expect(streamField(output, 'height')).toBe(String(PROJ[1]));
    expect(streamField(output, 'r_frame_rate')).toBe('30000/1001');
    expect(streamField(output, 'nb_frames')).toBe('9');
    expect(frameTimes(output)).toEqual(frameTimes(input));
    expect(partials(work)).toEqual([]);
  });

  it('keeps a late start time', async () => {
    const input = testVideo('late.mkv', 64, '25', 4, ['-c:v', 'ffv1', '-output_ts_offset', '1.5']);
    expect(frameTimes(input)[0]).toBe('1.500000');
    const output = join(work, 'late-out.mkv');
    const r = await skyfold(['warp', rig, input, '-o', output, '--json']);
    expect(r.code).toBe(0);
    expect(frameTimes(output)).toEqual(frameTimes(input));
  });

  it('recognises a video by probing, whatever its name', async () => {
    const input = testVideo('show-mp4', 64, '25', 3, ['-c:v', 'libx264', '-f', 'mp4']);
    const output = join(work, 'from-unnamed.mkv');
    const r = await skyfold(['warp', rig, input, '-o', output, '--json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout).done).toBe(3);
    expect(streamField(output, 'codec_name')).toBe('h264');
  });

  it('refuses a file named like a video that is not one', async () => {
    const fake = join(work, 'fake.mp4');
    writeFileSync(fake, 'not a video at all');
    const r = await skyfold(['warp', rig, fake, '-o', join(work, 'fake-out.mp4')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`skyfold: ${fake}: not a video (ffprobe finds no video stream in it)\n`);
  });

  it('refuses a non-square dome master', async () => {
    const input = testVideo('wide.mp4', [96, 64], '25', 2, ['-c:v', 'libx264']);
    const r = await skyfold(['warp', rig, input, '-o', join(work, 'wide-out.mp4')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(`skyfold: ${input}: the video is 96x64; a dome master is square (a fisheye circle in a square frame)\n`);
    expect(existsSync(join(work, 'wide-out.mp4'))).toBe(false);
  });

  it('refuses a variable frame rate, saying where', async () => {
    // frames 1-4 at 30 fps, then a two-frame gap
    const input = testVideo('vfr.mkv', 64, '30', 8, ['-vf', "setpts='(N+if(gte(N,4),2,0))/30/TB'", '-fps_mode', 'passthrough', '-c:v', 'ffv1']);
    const r = await skyfold(['warp', rig, input, '-o', join(work, 'vfr-out.mp4')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^skyfold: .*vfr\.mkv: variable frame rate \(frame 5 at 0\.200 s is off the 30 fps grid\)/);
    expect(existsSync(join(work, 'vfr-out.mp4'))).toBe(false);
  });

  it('wants a video file as the output', async () => {
    const input = testVideo('to-folder.mp4', 64, '25', 2, ['-c:v', 'libx264']);
    const r = await skyfold(['warp', rig, input, '-o', join(work, 'frames-out')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/a video warps to a video file: name it \.mp4 \.mov \.mkv \.webm \.avi/);
  });
});

describe.skipIf(!TOOLS)('a damaged video', () => {
  it('fails, naming where, rather than warping concealed or dropped frames', async () => {
    const input = testVideo('damaged.mkv', 128, '25', 50, ['-c:v', 'libx264', '-g', '10']);
    const bytes = readFileSync(input);
    // overwrite 3000 bytes in the middle of the file (packet data and cluster headers) with a fixed pattern
    for (let i = 0; i < 3000; i++) bytes[(bytes.length >> 1) + i] = (i * 151 + 7) & 255;
    writeFileSync(input, bytes);
    const output = join(work, 'damaged-out.mp4');
    const r = await skyfold(['warp', rig, input, '-o', output]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^skyfold: .*damaged\.mkv: damaged stream from (about )?frame \d+ .*: .+; nothing was written\n$/);
    expect(existsSync(output)).toBe(false);
    expect(partials(work)).toEqual([]);
  });

  it('fails on picture data the decoder finds damaged, where the container is intact', async () => {
    // in .mp4 the packet index sits apart from the picture data: damage the data, keep the index
    const input = testVideo('concealed.mp4', 128, '25', 50, ['-c:v', 'libx264', '-g', '10', '-movflags', '+faststart']);
    const bytes = readFileSync(input);
    for (let i = 0; i < 3000; i++) bytes[(bytes.length >> 1) + i] = (i * 151 + 7) & 255;
    writeFileSync(input, bytes);
    const output = join(work, 'concealed-out.mp4');
    const r = await skyfold(['warp', rig, input, '-o', output]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^skyfold: .*concealed\.mp4: damaged stream from about frame \d+ of 50 on: .+; nothing was written\n$/);
    expect(existsSync(output)).toBe(false);
  });
});
