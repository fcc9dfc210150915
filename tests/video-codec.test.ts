/**
 * The warped video's codec and colour: defaults per container, --codec/--crf/--preset, the
 * source's matrix and range on the way in, BT.709 tags on the way out, and ffv1 keeping RGB
 * samples exactly. Skipped, saying so, where ffmpeg is not installed.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { BAKE_DEFAULTS, REMAP_DEFAULTS, createImageLike, pixelMapFromRig, remap, type ImageBuffer } from '@skyfold/warp-core';
import { loadRig } from '@skyfold/warp-cli';
import { decodedFrames, ffmpeg, PROJ, setUpVideoWork, skyfold, streamField, testVideo, TOOLS } from './video-fixtures.js';

let work: string;
let rig: string;

beforeAll(() => {
  ({ work, rig } = setUpVideoWork('codec'));
});

/** What the warp promises for each frame: the library's remap with a rig warp's default settings. */
function libraryWarp(frames: Buffer, size: number, deep: boolean): Buffer {
  const map = pixelMapFromRig(loadRig(rig).rig, [size, size], { brightness: BAKE_DEFAULTS.brightness, brightnessFloor: BAKE_DEFAULTS.brightnessFloor, feather: BAKE_DEFAULTS.feather });
  const frameBytes = size * size * 3 * (deep ? 2 : 1);
  const parts: Buffer[] = [];
  for (let at = 0; at < frames.length; at += frameBytes) {
    const bytes = Buffer.from(frames.subarray(at, at + frameBytes)); // aligned copy
    const src: ImageBuffer = { width: size, height: size, channels: 3, data: deep ? new Uint16Array(bytes.buffer, bytes.byteOffset, frameBytes / 2) : new Uint8Array(bytes) };
    const out = remap(src, map, { filter: REMAP_DEFAULTS.filter, out: createImageLike(src, map.width, map.height) });
    parts.push(Buffer.from(out.data.buffer, out.data.byteOffset, out.data.byteLength));
  }
  return Buffer.concat(parts);
}

describe.skipIf(!TOOLS)('codec and colour', () => {
  it('ffv1 keeps the warped RGB samples exactly, 8-bit and 16-bit', async () => {
    for (const [pixFmt, raw, deep] of [['bgr0', 'rgb24', false], ['rgb48le', 'rgb48le', true]] as const) {
      const input = testVideo(work, `lossless-${pixFmt}.mkv`, 80, '25', 3, ['-c:v', 'ffv1', '-pix_fmt', pixFmt]);
      const output = join(work, `lossless-${pixFmt}-out.mkv`);
      const r = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', '--json']);
      expect(r.stderr).toBe('');
      expect(r.code).toBe(0);
      expect(streamField(output, 'pix_fmt')).toBe(deep ? 'gbrp16le' : 'bgr0'); // ffv1 stores 16-bit RGB as planar GBR, losslessly
      const got = decodedFrames(output, raw);
      expect(got.length).toBe(3 * PROJ[0] * PROJ[1] * 3 * (deep ? 2 : 1));
      expect(got.equals(libraryWarp(decodedFrames(input, raw), 80, deep))).toBe(true);
    }
  });

  it('writes H.264 in .mp4 by default at CRF 18, tagged BT.709 limited range', async () => {
    const input = testVideo(work, 'plain.mp4', 64, '25', 2, ['-c:v', 'libx264']);
    const output = join(work, 'plain-out.mp4');
    expect((await skyfold(['warp', rig, input, '-o', output])).code).toBe(0);
    expect(['codec_name', 'pix_fmt', 'color_space', 'color_primaries', 'color_transfer', 'color_range'].map((f) => streamField(output, f))).toEqual(['h264', 'yuv420p', 'bt709', 'bt709', 'bt709', 'tv']);
    // x264 writes its settings into the stream (an SEI message): the rate control is CRF 18
    expect(readFileSync(output).toString('latin1')).toMatch(/rc=crf .*crf=18\.0/);
  });

  it('takes --crf and --preset for x264, and ProRes 422 HQ by default in .mov', async () => {
    const input = testVideo(work, 'settings.mp4', 64, '25', 2, ['-c:v', 'libx264']);
    const fast = join(work, 'settings-out.mp4');
    expect((await skyfold(['warp', rig, input, '-o', fast, '--crf', '30', '--preset', 'ultrafast'])).code).toBe(0);
    const sei = readFileSync(fast).toString('latin1');
    expect(sei).toMatch(/crf=30\.0/);
    expect(sei).toMatch(/subme=0/); // ultrafast's subpixel refinement (x264 --fullhelp)
    const mov = join(work, 'settings-out.mov');
    expect((await skyfold(['warp', rig, input, '-o', mov])).code).toBe(0);
    expect(['codec_name', 'profile', 'pix_fmt'].map((f) => streamField(mov, f))).toEqual(['prores', 'HQ', 'yuv422p10le']);
  });

  it('refuses settings that do not apply, in one line', async () => {
    const input = testVideo(work, 'refuse.mp4', 64, '25', 2, ['-c:v', 'libx264']);
    const cases: [string[], string][] = [
      [['-o', join(work, 'r.mov'), '--crf', '20'], 'skyfold: --crf: prores has no CRF (it applies to h264, hevc and vp9)\n'],
      [['-o', join(work, 'r.mp4'), '--codec', 'ffv1'], 'skyfold: --codec ffv1: not for .mp4 files; .mp4 takes h264, hevc, vp9\n'],
      [['-o', join(work, 'r.mp4'), '--preset', 'quick'], 'skyfold: --preset: expected one of ultrafast, superfast, veryfast, faster, fast, medium, slow, slower, veryslow, placebo, got "quick"\n'],
      [['-o', join(work, 'r.mp4'), '--crf', '60'], 'skyfold: --crf: h264 takes 0 to 51, got 60\n'],
    ];
    for (const [args, message] of cases) {
      const r = await skyfold(['warp', rig, input, ...args]);
      expect(r.code).toBe(2);
      expect(r.stderr).toBe(message);
    }
  });

  it("decodes with the source's own matrix: a flat colour comes back as it was under BT.601 and BT.709 tags", async () => {
    // the same RGB colour encoded as YCbCr under each matrix and tagged so; a decoder using the wrong
    // matrix would be off by several code values in this saturated orange
    const colour = [0xe0, 0x70, 0x20];
    for (const space of ['bt709', 'smpte170m']) {
      const input = join(work, `flat-${space}.mkv`);
      const matrix = space === 'bt709' ? 'bt709' : 'smpte170m';
      ffmpeg(['-f', 'lavfi', '-i', `color=c=0x${colour.map((c) => c.toString(16).padStart(2, '0')).join('')}:size=64x64:rate=25`, '-frames:v', '2',
        '-vf', `scale=out_color_matrix=${matrix}:out_range=tv`, '-c:v', 'ffv1', '-pix_fmt', 'yuv444p', '-colorspace', space, '-color_range', 'tv', input]);
      const output = join(work, `flat-${space}-out.mkv`);
      expect((await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', '--brightness', '0', '--filter', 'nearest'])).code).toBe(0);
      const rgb = decodedFrames(output);
      // the pixel at the projector frame's centre lands on the dome master's content
      const k = ((PROJ[1] >> 1) * PROJ[0] + (PROJ[0] >> 1)) * 3;
      const got = [rgb[k], rgb[k + 1], rgb[k + 2]];
      for (let c = 0; c < 3; c++) expect(Math.abs(got[c] - colour[c]), `${space} channel ${c}: ${got} vs ${colour}`).toBeLessThanOrEqual(2);
    }
  });
});
