/**
 * Shared by the video tests: tiny synthetic videos made with ffmpeg, and ffprobe read-outs (the
 * in-process runner is support.ts's). Everything here needs ffmpeg; `TOOLS` is undefined without it.
 */
import { spawnSync } from 'node:child_process';
import { readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { tryVideoTools } from '@skyfold/warp-cli';
import { demoRigText, skyfold, tempDir } from './support.js';

export const TOOLS = tryVideoTools(undefined);
/** The projector size of the small rig the video tests warp for. */
export const PROJ: [number, number] = [96, 60];

export function ffmpeg(args: string[]): void {
  const r = spawnSync(TOOLS!.ffmpeg, ['-v', 'error', '-nostdin', '-y', ...args], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`ffmpeg ${args.join(' ')}: ${r.stderr}`);
}

export function ffprobe(args: string[]): string {
  const r = spawnSync(TOOLS!.ffprobe, ['-v', 'error', ...args], { encoding: 'utf8', maxBuffer: 1 << 26 });
  if (r.status !== 0) throw new Error(`ffprobe ${args.join(' ')}: ${r.stderr}`);
  return r.stdout;
}

/** A testsrc video in `dir`: `frames` frames of size×size at `rate`, with extra output arguments. */
export function testVideo(dir: string, name: string, size: number | [number, number], rate: string, frames: number, extra: string[]): string {
  const path = join(dir, name);
  const [w, h] = typeof size === 'number' ? [size, size] : size;
  ffmpeg(['-f', 'lavfi', '-i', `testsrc=size=${w}x${h}:rate=${rate}`, '-frames:v', String(frames), ...extra, path]);
  return path;
}

/** Presentation times of the video frames, as ffprobe reads them. */
export function frameTimes(path: string): string[] {
  return ffprobe(['-select_streams', 'v:0', '-show_entries', 'frame=pts_time', '-of', 'csv=p=0', path])
    .split('\n')
    .map((l) => l.split(',')[0].trim())
    .filter(Boolean);
}

export function streamField(path: string, field: string, stream = 'v:0'): string {
  return ffprobe(['-select_streams', stream, '-show_entries', `stream=${field}`, '-of', 'default=nw=1:nk=1', path]).trim();
}

/** One hash per packet of a stream, taken without decoding (ffmpeg's framemd5 muxer on a stream copy): size and md5. */
export function packetHashes(path: string, stream: string): string[] {
  const r = spawnSync(TOOLS!.ffmpeg, ['-v', 'error', '-i', path, '-map', `0:${stream}`, '-c', 'copy', '-f', 'framemd5', '-'], { encoding: 'utf8', maxBuffer: 1 << 26 });
  if (r.status !== 0) throw new Error(`framemd5 of ${path} ${stream}: ${r.stderr}`);
  return r.stdout
    .split('\n')
    .filter((l) => l && !l.startsWith('#'))
    .map((l) => {
      const f = l.split(',').map((x) => x.trim());
      return `${f[4]}:${f[5]}`; // size and md5 of the bytes (durations are in each container's time base)
    });
}

/** The raw RGB frames ffmpeg decodes from a video, concatenated. */
export function decodedFrames(path: string, pixFmt: 'rgb24' | 'rgb48le' = 'rgb24'): Buffer {
  const r = spawnSync(TOOLS!.ffmpeg, ['-v', 'error', '-i', path, '-map', '0:v:0', '-f', 'rawvideo', '-pix_fmt', pixFmt, '-'], { maxBuffer: 1 << 28 });
  if (r.status !== 0) throw new Error(`decoding ${path}: ${r.stderr.toString()}`);
  return r.stdout;
}

export { skyfold };

/** Temporary files a video run left in `dir` (there must be none). */
export function partials(dir: string): string[] {
  return readdirSync(dir).filter((n) => n.includes('skyfold-partial'));
}

/** A temporary folder with a small copy of the demo rig (projector PROJ). Says once per file when the video tests are skipped. */
export function setUpVideoWork(name: string): { work: string; rig: string } {
  if (!TOOLS) console.warn(`${name}: video tests skipped: ffmpeg and ffprobe are not installed (apt-get install ffmpeg)`);
  const work = tempDir(`video-${name}`);
  const rig = join(work, 'rig.yaml');
  writeFileSync(rig, demoRigText(PROJ));
  return { work, rig };
}
