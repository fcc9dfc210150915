/**
 * A rerun with finished segments between missing ones (issue 13): each run of consecutive missing
 * segments gets a decoder of its own that seeks to its first frame, so the finished segments in the
 * holes are not decoded again; the joined video equals one uninterrupted run frame for frame.
 * The ffmpeg given with --ffmpeg is a small script that notes its arguments and runs the real one.
 */
import { chmodSync, mkdirSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { contiguousRuns } from '@skyfold/warp-cli';
import { decodedFrames, setUpVideoWork, skyfold, testVideo, TOOLS } from './video-fixtures.js';

describe('runs of consecutive segments', () => {
  it('groups the segments to make into runs', () => {
    expect(contiguousRuns([])).toEqual([]);
    expect(contiguousRuns([0, 2, 4])).toEqual([[0], [2], [4]]);
    expect(contiguousRuns([0, 1, 3, 4, 5, 9])).toEqual([[0, 1], [3, 4, 5], [9]]);
  });
});

describe.skipIf(!TOOLS)('a patchy rerun', () => {
  let work: string;
  let rig: string;
  let input: string;
  let wrapper: string;
  let log: string;
  beforeAll(() => {
    ({ work, rig } = setUpVideoWork('patchy'));
    // 20 frames at 25 fps, segments of 4 frames: 5 segments
    input = testVideo(work, 'show.mp4', 128, '25', 20, ['-c:v', 'libx264', '-g', '4', '-pix_fmt', 'yuv420p']);
    log = join(work, 'ffmpeg-calls.txt');
    wrapper = join(work, 'tools', 'ffmpeg');
    const tools = join(work, 'tools');
    mkdirSync(tools);
    writeFileSync(wrapper, `#!/bin/sh\necho "$*" >> '${log}'\nexec '${TOOLS!.ffmpeg}' "$@"\n`);
    chmodSync(wrapper, 0o755);
    symlinkSync(TOOLS!.ffprobe, join(tools, 'ffprobe'));
  });

  it('seeks past the finished segments instead of decoding them, and the joined frames equal a whole run', async () => {
    const seg = ['--codec', 'ffv1', '--segment', '0.16'];
    const whole = join(work, 'whole.mkv');
    expect((await skyfold(['warp', rig, input, '-o', whole, ...seg, '--json'])).code).toBe(0);
    const output = join(work, 'patchy.mkv');
    // shards 2/5 and 4/5 make segments 2 and 4 (frames 4-7 and 12-15): holes at 1, 3 and 5
    for (const k of [2, 4]) expect((await skyfold(['warp', rig, input, '-o', output, ...seg, '--shard', `${k}/5`])).code).toBe(0);
    writeFileSync(log, '');
    const r = await skyfold(['warp', rig, input, '-o', output, ...seg, '--ffmpeg', wrapper, '--json']);
    expect(r.code, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout)).toMatchObject({ done: 12, skipped: 8, total: 20 });
    const decoders = readFileSync(log, 'utf8').split('\n').filter((l) => / -f rawvideo /.test(l) && / pipe:1$/.test(l));
    expect(decoders).toHaveLength(3);
    // no seek for the first, then to frames 8 and 16 (half a frame early, at 25 fps)
    const seeks = decoders.map((l) => / -ss (\S+) /.exec(l)?.[1] ?? null);
    expect(seeks[0]).toBeNull();
    expect(Number(seeks[1])).toBeCloseTo(7.5 / 25, 5);
    expect(Number(seeks[2])).toBeCloseTo(15.5 / 25, 5);
    expect(decodedFrames(output).equals(decodedFrames(whole))).toBe(true);
  });
});

