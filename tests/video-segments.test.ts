/**
 * A video is warped in segments kept between runs (issue 13): a killed run, rerun, makes only the
 * missing segments; shards each make a block and a plain run joins them; in every case the frames
 * are those of one uninterrupted run. FFV1 (lossless) output makes "the same frames" exact.
 */
import { existsSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { planSegments, segmentFrames, shardSegments } from '@skyfold/warp-cli';
import { spawnSkyfold, whileRunning } from './support.js';
import { decodedFrames, frameTimes, partials, setUpVideoWork, skyfold, testVideo as makeVideo, TOOLS } from './video-fixtures.js';

let work: string;
let rig: string;
let input: string;
let whole: Buffer;
let wholeTimes: string[];

const FRAMES = 20;
// 0.16 s at 25 fps: segments of 4 frames, 5 of them
const SEG = ['--segment', '0.16'];
const partsOf = (output: string) => `${output}.skyfold-parts`;
const segmentsIn = (output: string) => (existsSync(partsOf(output)) ? readdirSync(partsOf(output)).filter((n) => /^segment-\d+\.nut$/.test(n)) : []);

describe('cutting into segments', () => {
  it('covers every frame once, the last segment shorter', () => {
    const p = planSegments(50, { num: 25, den: 1 }, 0.3); // 8 frames a segment
    expect(p).toEqual({ frameCount: 50, framesPerSegment: 8, count: 7 });
    expect(segmentFrames(p, 0)).toEqual([0, 8]);
    expect(segmentFrames(p, 6)).toEqual([48, 50]);
  });

  it('gives each shard a contiguous block, all blocks together every segment once', () => {
    const p = planSegments(1000, { num: 30000, den: 1001 }, 4); // 120 frames a segment, 9 segments
    expect(p.framesPerSegment).toBe(120);
    const blocks = [1, 2, 3, 4].map((k) => shardSegments(p, [k, 4]));
    expect(blocks.flat()).toEqual(Array.from({ length: p.count }, (_, k) => k));
    for (const b of blocks) expect(b).toEqual(Array.from({ length: b.length }, (_, i) => b[0] + i));
    expect(shardSegments(p, [5, 5]).length).toBeGreaterThan(0);
  });
});

describe.skipIf(!TOOLS)('a video warped in segments', () => {
  beforeAll(async () => {
    ({ work, rig } = setUpVideoWork('segments'));
    input = makeVideo(work, 'show.mp4', 128, '25', FRAMES, ['-c:v', 'libx264', '-g', '12', '-pix_fmt', 'yuv420p']);
    const output = join(work, 'whole.mkv');
    const r = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', '--segment', '1000', '--json']);
    expect(r.code).toBe(0);
    whole = decodedFrames(output);
    wholeTimes = frameTimes(output);
  });

  it('gives the frames and timestamps of one uninterrupted run, and leaves no parts behind', async () => {
    const output = join(work, 'cut.mkv');
    const r = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(r.stdout)).toMatchObject({ done: FRAMES, skipped: 0, total: FRAMES, segments: { count: 5, frames: 4, warped: 5, joined: true } });
    expect(decodedFrames(output).equals(whole)).toBe(true);
    expect(frameTimes(output)).toEqual(wholeTimes);
    expect(existsSync(partsOf(output))).toBe(false);
    expect(partials(work)).toEqual([]);
  });

  it('three shards and a join give the same frames; the join warps nothing', async () => {
    const output = join(work, 'farm.mkv');
    const made: number[] = [];
    for (const k of [1, 2, 3]) {
      const r = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--shard', `${k}/3`, '--json']);
      expect(r.code).toBe(0);
      const s = JSON.parse(r.stdout);
      expect(s.segments.joined).toBe(false);
      made.push(s.done);
      expect(existsSync(output)).toBe(false);
    }
    expect(made.reduce((a, b) => a + b, 0)).toBe(FRAMES);
    expect(segmentsIn(output)).toHaveLength(5);
    const join_ = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--json']);
    expect(join_.code).toBe(0);
    expect(JSON.parse(join_.stdout)).toMatchObject({ done: 0, skipped: FRAMES, total: FRAMES });
    expect(decodedFrames(output).equals(whole)).toBe(true);
    expect(frameTimes(output)).toEqual(wholeTimes);
  });

  it('a shard rerun makes nothing again; the words say where the parts are', async () => {
    const output = join(work, 'again.mkv');
    const first = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--shard', '2/2']);
    expect(first.code).toBe(0);
    expect(first.stderr).toMatch(/^12 frames warped .* -> .*again\.mkv\.skyfold-parts \(segments of shard 2\/2; a plain run joins them into .*again\.mkv\)\n$/);
    const second = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--shard', '2/2', '--json']);
    expect(JSON.parse(second.stdout)).toMatchObject({ done: 0, skipped: 12 });
  });

  it('a run killed at any moment, rerun, gives the same frames as an uninterrupted one', async () => {
    const output = join(work, 'killed.mkv');
    // kill as soon as two segments are finished (the third one half made)
    const run = spawnSkyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG]);
    const caught = await whileRunning(run.child, () => segmentsIn(output).length >= 2);
    run.child.kill('SIGKILL');
    await run.done;
    expect(caught).toBe(true);
    const kept = segmentsIn(output).length;
    expect(existsSync(output)).toBe(false);
    const r = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--json']);
    expect(r.code).toBe(0);
    const s = JSON.parse(r.stdout);
    expect(s.skipped).toBe(kept * 4);
    expect(s.done).toBe(FRAMES - kept * 4);
    expect(decodedFrames(output).equals(whole)).toBe(true);
    expect(frameTimes(output)).toEqual(wholeTimes);
    expect(partials(work)).toEqual([]);
  });

  it('parts made with other settings are not mixed in: the run starts again, saying so', async () => {
    const output = join(work, 'changed.mkv');
    expect((await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--shard', '1/2', '--filter', 'nearest'])).code).toBe(0);
    const r = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--json']);
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/changed\.mkv\.skyfold-parts: its segments were made from another source, rig or settings; starting again/);
    expect(JSON.parse(r.stdout)).toMatchObject({ done: FRAMES, skipped: 0 });
    expect(decodedFrames(output).equals(whole)).toBe(true);
  });

  it('--overwrite makes every segment again', async () => {
    const output = join(work, 'redo.mkv');
    expect((await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--shard', '1/2'])).code).toBe(0);
    const r = await skyfold(['warp', rig, input, '-o', output, '--codec', 'ffv1', ...SEG, '--overwrite', '--json']);
    expect(JSON.parse(r.stdout)).toMatchObject({ done: FRAMES, skipped: 0 });
  });

  it('refuses frame-folder options and a parts folder that is a link', async () => {
    const r = await skyfold(['warp', rig, input, '-o', join(work, 'x.mkv'), '--frames', '1-10']);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe('skyfold: --frames: not for a video input (it is warped whole, to a video file)\n');
    const seg = await skyfold(['warp', rig, join(work, 'nothing'), '-o', join(work, 'y'), '--segment', '2']);
    expect(seg.code).toBe(2);
    writeFileSync(join(work, 'target'), '');
    const { symlinkSync } = await import('node:fs');
    symlinkSync(join(work, 'target'), partsOf(join(work, 'linked.mkv')));
    const l = await skyfold(['warp', rig, input, '-o', join(work, 'linked.mkv'), '--codec', 'ffv1']);
    expect(l.code).toBe(2);
    expect(l.stderr).toMatch(/linked\.mkv\.skyfold-parts: the parts folder is a symbolic link/);
  });
});
