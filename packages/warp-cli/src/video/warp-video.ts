/**
 * Warping a video to a video, frame for frame: ffmpeg decodes to raw RGB (8-bit, or 16-bit for
 * deeper sources), the existing kernels warp each frame, a second ffmpeg encodes them at the
 * source's exact rate and start time. The result is written under a temporary name and renamed
 * only when every frame made it.
 */
import { renameSync, rmSync, statSync } from 'node:fs';
import { hostname } from 'node:os';
import { basename, dirname, join, resolve } from 'node:path';
import { remap, type RemapFilter } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { runContext, setExitCode, writeErr } from '../io/run-context.js';
import type { MapSettings, MapSource } from '../warp/map-source.js';
import { Progress } from '../warp/progress.js';
import { stopOnSignals } from '../warp/stop-signal.js';
import type { BatchSummary } from '../warp/summary.js';
import { warn } from '../messages.js';
import { planCarry } from './carry.js';
import { startChild as start, stopChild as stop, type RunningChild as Running } from './child.js';
import { planEncode, scaleMatrixName, sourceMatrix, type VideoEncodeOptions } from './encode.js';
import { FrameReader, rgbFrame, TruncatedFrame, writeFlushed } from './frame-stream.js';
import { type VideoInfo } from './probe.js';
import { formatRational } from './rational.js';
import type { VideoTools } from './tools.js';

export interface VideoWarpOptions extends VideoEncodeOptions {
  filter: RemapFilter;
  output: string;
  /** Progress on a terminal. */
  progress: boolean;
}

export interface VideoWarpSummary extends BatchSummary {
  video: { size: [number, number]; projector: [number, number]; rate: string; codec: string; pixFmt: string; rotation: number };
}

/** ffmpeg arguments that decode the first video stream to packed RGB, every frame once, in the source's matrix and range. */
export function decodeArgs(info: VideoInfo, pixFmt: 'rgb24' | 'rgb48le'): string[] {
  const args = ['-v', 'error', '-nostdin', '-i', info.path, '-map', `0:${info.videoIndex}`, '-fps_mode', 'passthrough'];
  if (!info.rgb) {
    const matrix = scaleMatrixName(sourceMatrix(info.colour, info.height));
    const range = info.colour.range ?? (info.pixFmt.startsWith('yuvj') ? 'pc' : 'tv');
    args.push('-vf', `scale=in_color_matrix=${matrix}:in_range=${range}:out_range=pc:flags=accurate_rnd+full_chroma_int`);
  }
  args.push('-f', 'rawvideo', '-pix_fmt', pixFmt, 'pipe:1');
  return args;
}

class Stopped extends Error {}

/** The decoder reported an error while about `frames` frames had come through (it reads a little ahead). */
function damaged(info: VideoInfo, frames: number, line: string): UserError {
  return new UserError(`${info.path}: damaged stream from about frame ${frames + 1} of ${info.frameCount} on: ${line}; nothing was written`);
}

/**
 * Warps `info`'s video through `source`'s map into `opts.output`. Throws UserError when any frame
 * cannot be made; undefined when a signal stopped the run (exit code 130, nothing written).
 */
export async function warpVideo(tools: VideoTools, source: MapSource, mapSettings: MapSettings, info: VideoInfo, opts: VideoWarpOptions): Promise<VideoWarpSummary | undefined> {
  const t0 = performance.now();
  if (info.width !== info.height) {
    throw new UserError(`${info.path}: the video is ${info.width}x${info.height}; a dome master is square (a fisheye circle in a square frame)`);
  }
  const output = resolve(opts.output);
  try {
    const a = statSync(output);
    const b = statSync(info.path);
    if (a.dev === b.dev && a.ino === b.ino) throw new UserError(`${opts.output}: is the input video; write the warped video to another file`);
  } catch (e) {
    if (e instanceof UserError) throw e;
  }
  const deep = info.bitDepth > 8;
  const pixFmt = deep ? 'rgb48le' : 'rgb24';
  const plan = planEncode(output, opts, info.colour, deep);
  const map = source.build([info.width, info.height], mapSettings);
  const { bytes: inBuf, image: src } = rgbFrame(info.width, info.height, deep ? 2 : 1);
  const { bytes: outBuf, image: out } = rgbFrame(map.width, map.height, deep ? 2 : 1);

  const host = hostname().replace(/[^A-Za-z0-9]/g, '');
  const temp = join(dirname(output), `.${basename(output)}.skyfold-partial-${host}-${process.pid}`);
  const rate = formatRational(info.rate);
  const carry = planCarry(info, plan.muxer);
  for (const d of carry.dropped) warn(`${info.path}: left out ${d}`);
  const encodeArgs = ['-v', 'error', '-nostdin', '-y', '-f', 'rawvideo', '-pix_fmt', pixFmt, '-video_size', `${map.width}x${map.height}`, '-framerate', rate];
  // times as in the source: ffmpeg starts each input at zero, so the frames are placed after the
  // file's earliest stream and the whole output moved to the file's start (an output offset:
  // -itsoffset alone lands half a frame off in Matroska)
  const lead = info.startTime - info.fileStart;
  if (lead > 0) encodeArgs.push('-itsoffset', String(lead));
  encodeArgs.push('-i', 'pipe:0', '-i', info.path, '-map', '0:v', ...carry.args, ...plan.args);
  if (info.fileStart !== 0) encodeArgs.push('-output_ts_offset', String(info.fileStart));
  encodeArgs.push('-f', plan.muxer, temp);

  let decoder: Running | undefined;
  let encoder: Running | undefined;
  let frames = 0;
  const stderr = runContext().stderr;
  const progress = new Progress(info.frameCount, stderr, opts.progress && Boolean(stderr.isTTY));
  // a signal ends the children and the run; nothing is left under the output's name
  const signal = stopOnSignals();
  const stopped = signal.stopped.then(() => Symbol('stopped'));
  try {
    decoder = start(tools.ffmpeg, decodeArgs(info, pixFmt), 'ignore');
    encoder = start(tools.ffmpeg, encodeArgs, 'pipe');
    const sink = encoder.child.stdin!;
    sink.on('error', () => {}); // a closed pipe is reported from the encoder's exit below
    const reader = new FrameReader(decoder.child.stdout!, inBuf.length);
    // the encoder may stop early (a refused stream, a full disk): every wait below also ends then
    const gone = Symbol('encoder gone');
    const encoderGone = encoder.exited.then(() => gone);
    for (;;) {
      const more = await Promise.race([reader.next(inBuf).catch((e: unknown) => (e instanceof TruncatedFrame ? false : Promise.reject(e))), encoderGone, stopped]);
      if (more !== true) break;
      // ffmpeg conceals a damaged packet and carries on; any error it reports fails the run instead
      if (decoder.stderr.text) throw damaged(info, frames, decoder.stderr.firstLine);
      remap(src, map, { filter: opts.filter, out });
      const wrote = await Promise.race([writeFlushed(sink, outBuf).catch(() => gone), encoderGone, stopped]);
      if (wrote === gone || signal.stopping) break;
      frames++;
      progress.tick(String(frames), true);
    }
    if (signal.stopping) throw new Stopped();
    sink.end();
    if (encoder.child.exitCode !== null || encoder.child.signalCode !== null) stop(decoder);
    const [dcode, ecode] = await Promise.all([decoder.exited, encoder.exited]);
    progress.finish();
    if (ecode !== 0) throw new UserError(`${opts.output}: ffmpeg could not write the video: ${encoder.stderr.firstLine || `exit ${ecode}`}`);
    if (decoder.stderr.text && dcode === 0) throw damaged(info, frames, decoder.stderr.firstLine);
    if (dcode !== 0) {
      throw new UserError(`${info.path}: decoding failed at frame ${frames + 1} of ${info.frameCount}: ${decoder.stderr.firstLine || `exit ${dcode}`}`);
    }
    if (frames !== info.frameCount) {
      const missing = frames < info.frameCount ? `frames ${frames + 1}-${info.frameCount} did not decode (a damaged stream?)` : `${frames - info.frameCount} more than its packets`;
      throw new UserError(`${info.path}: got ${frames} of ${info.frameCount} frames: ${missing}; nothing was written`);
    }
    renameSync(temp, output);
  } catch (e) {
    stop(decoder);
    stop(encoder);
    await Promise.all([decoder?.exited, encoder?.exited]);
    rmSync(temp, { force: true });
    if (!(e instanceof Stopped)) throw e;
    progress.finish();
    writeErr(`skyfold: stopped after ${frames} of ${info.frameCount} frames; nothing was written to ${opts.output}\n`);
    setExitCode(130);
    return undefined;
  } finally {
    signal.dispose();
  }
  return {
    done: frames,
    skipped: 0,
    failed: 0,
    failures: [],
    total: info.frameCount,
    output: opts.output,
    seconds: (performance.now() - t0) / 1000,
    video: { size: [info.width, info.height], projector: [map.width, map.height], rate, codec: plan.codec, pixFmt: info.pixFmt, rotation: info.rotation },
  };
}
