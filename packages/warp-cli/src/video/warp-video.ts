/**
 * Warping a video to a video, frame for frame: ffmpeg decodes to raw RGB (8-bit, or 16-bit for
 * deeper sources), the existing kernels warp each frame, a second ffmpeg encodes them at the
 * source's exact rate and start time. The result is written under a temporary name and renamed
 * only when every frame made it.
 */
import { existsSync, realpathSync, renameSync, rmSync, statSync } from 'node:fs';
import { devNull } from 'node:os';
import { basename, dirname, join, resolve } from 'node:path';
import { remap, type RemapFilter, type RemapMap } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { runContext, setExitCode, writeErr } from '../io/run-context.js';
import type { MapSettings, MapSource } from '../warp/map-source.js';
import { Progress } from '../warp/progress.js';
import { stopOnSignals, type StopSignal } from '../warp/stop-signal.js';
import { hostTag, partialTag } from '../warp/output-folder.js';
import { writeFileAtomic } from '../io/output-file.js';
import type { BatchSummary } from '../warp/summary.js';
import { warn } from '../messages.js';
import { planCarry, type CarryPlan } from './carry.js';
import { runToEnd, startChild as start, stopChild as stop, type RunningChild as Running } from './child.js';
import { planEncode, scaleMatrixName, sourceMatrix, type EncodePlan, type VideoEncodeOptions } from './encode.js';
import { areaPlanFor } from '../warp/job.js';
import { concatList, contiguousRuns, DEFAULT_SEGMENT_SECONDS, openPartsFolder, planSegments, recordSegment, segmentFrames, segmentName, shardSegments, type PartsFolder, type SegmentPlan } from './segments.js';
import { FrameReader, rgbFrame, TruncatedFrame, writeFlushed } from './frame-stream.js';
import { type VideoInfo } from './probe.js';
import { formatRational } from './rational.js';
import type { VideoTools } from './tools.js';

export interface VideoWarpOptions extends VideoEncodeOptions {
  filter: RemapFilter;
  output: string;
  /** Progress on a terminal. */
  progress: boolean;
  /** Only the K-th of N blocks of segments, into the parts folder, without joining. */
  shard?: [number, number];
  /** Segment length (DEFAULT_SEGMENT_SECONDS when not given). */
  segmentSeconds?: number;
  /** Make every segment again, even those a earlier run finished. */
  overwrite?: boolean;
}

export interface VideoWarpSummary extends BatchSummary {
  video: { size: [number, number]; projector: [number, number]; rate: string; codec: string; pixFmt: string; rotation: number };
  /** How the run went by segments: of `count` (`frames` each), this run's share `mine`, `warped` of them made now; the parts folder when left for a join. */
  segments: { count: number; frames: number; mine: number; warped: number; joined: boolean; parts?: string };
}

/** ffmpeg arguments that decode the first video stream to packed RGB, every frame once, in the source's matrix and range. */
export function decodeArgs(info: VideoInfo, pixFmt: 'rgb24' | 'rgb48le', from = 0): string[] {
  const args = ['-v', 'error', '-nostdin'];
  // from frame `from` on: an input seek is exact when decoding (frames before the target are
  // decoded and dropped), relative to the file's start; aim half a frame early so that rounding
  // cannot drop the frame itself
  if (from > 0) args.push('-ss', (info.startTime - info.fileStart + ((from - 0.5) * info.rate.den) / info.rate.num).toFixed(6));
  args.push('-i', info.path, '-map', `0:${info.videoIndex}`, '-fps_mode', 'passthrough');
  if (!info.rgb) {
    const matrix = scaleMatrixName(sourceMatrix(info.colour, info.height));
    const range = info.colour.range ?? (info.pixFmt.startsWith('yuvj') ? 'pc' : 'tv');
    args.push('-vf', `scale=in_color_matrix=${matrix}:in_range=${range}:out_range=pc:flags=accurate_rnd+full_chroma_int`);
  }
  args.push('-f', 'rawvideo', '-pix_fmt', pixFmt, 'pipe:1');
  return args;
}

/** The HDR transfers (ffprobe's names): their code values are not light through the sRGB curve. */
const HDR_TRANSFERS: Record<string, string> = { smpte2084: 'PQ (SMPTE ST 2084)', 'arib-std-b67': 'HLG (ARIB STD-B67)' };

/**
 * A warning for an HDR source: the frames are warped and tagged as they came (the tags carried, 10-bit
 * samples through RGB48), but the light per pixel (brightness compensation and the edge ramp) is applied
 * through the sRGB transfer function (IEC 61966-2-1), which is not the source's curve.
 */
export function hdrTransferWarning(info: Pick<VideoInfo, 'path' | 'colour'>): string | undefined {
  const name = info.colour.transfer && HDR_TRANSFERS[info.colour.transfer];
  if (!name) return undefined;
  return `${info.path}: an HDR video (transfer ${name}): its frames are warped and tagged as they are, but the brightness compensation and the edge ramp are computed through the sRGB curve, not ${name.split(' ')[0]}'s, so the light across the dome will be uneven; warp with --brightness 0, or make an SDR (BT.709) master first`;
}

class Stopped extends Error {}

const STOPPED = Symbol('stopped');
const GONE = Symbol('encoder gone');

/** An error of the source itself: its segments are of no use, the parts folder goes with it. */
class SourceError extends UserError {}

function sourceError(message: string): UserError {
  return new SourceError(message);
}

/** The decoder reported an error while about `frames` frames had come through (it reads a little ahead). */
function damaged(info: VideoInfo, frames: number, line: string): UserError {
  return sourceError(`${info.path}: damaged stream from about frame ${frames + 1} of ${info.frameCount} on: ${line}; nothing was written`);
}

/**
 * Warps `info`'s video through `source`'s map into `opts.output`, segment by segment (segments.ts):
 * finished segments are kept between runs, a shard makes only its block of them, a plain run joins
 * them all. Throws UserError when any frame cannot be made; undefined when a signal stopped the run
 * (exit code 130; the finished segments are kept, the output is not written).
 */
export async function warpVideo(tools: VideoTools, source: MapSource, mapSettings: MapSettings, info: VideoInfo, opts: VideoWarpOptions): Promise<VideoWarpSummary | undefined> {
  const t0 = performance.now();
  if (info.width !== info.height) {
    throw new UserError(`${info.path}: the video is ${info.width}x${info.height}; a dome master is square (a fisheye circle in a square frame)`);
  }
  const output = resolve(opts.output);
  refuseInputAsOutput(output, info.path, opts.output);
  const deep = info.bitDepth > 8;
  const pixFmt = deep ? 'rgb48le' : 'rgb24';
  const plan = planEncode(output, opts, info.colour, deep);
  const carry = planCarry(info, plan.muxer);
  for (const d of carry.dropped) warn(`${info.path}: left out ${d}`);
  if (!opts.shard) await checkCarried(tools, info, plan, carry, opts.output);
  const map = source.build([info.width, info.height], mapSettings);
  const hdr = hdrTransferWarning(info);
  if (hdr) warn(hdr);
  const segs = planSegments(info.frameCount, info.rate, opts.segmentSeconds ?? DEFAULT_SEGMENT_SECONDS);
  const src = statSync(info.path);
  const identity = JSON.stringify({
    source: { path: realpathSync(info.path), size: src.size, mtimeMs: src.mtimeMs },
    map: source.key,
    mapSettings,
    filter: opts.filter,
    projector: [map.width, map.height],
    pixFmt,
    encode: plan.args,
    rate: formatRational(info.rate),
    frames: info.frameCount,
    framesPerSegment: segs.framesPerSegment,
  });
  const parts = openPartsFolder(output, identity, segs, Boolean(opts.overwrite));
  if (parts.restarted) warn(`${parts.dir}: its segments were made from another source, rig or settings; starting again`);
  const mine = shardSegments(segs, opts.shard);
  const todo = mine.filter((k) => !parts.done.has(k));
  const framesOf = (ks: number[]) => ks.reduce((sum, k) => sum + segmentFrames(segs, k)[1] - segmentFrames(segs, k)[0], 0);
  const total = framesOf(mine);
  const skipped = total - framesOf(todo);
  const job: SegmentJob = { tools, info, map, filter: opts.filter, pixFmt, plan, segs, parts, todo, output: opts.output, progress: opts.progress };
  const signal = stopOnSignals();
  let warped = 0;
  try {
    warped = await warpSegments(job, signal, (n) => (warped = n));
    if (!opts.shard) await joinSegments(job, carry, output, signal);
  } catch (e) {
    if (e instanceof SourceError) rmSync(parts.dir, { recursive: true, force: true });
    if (!(e instanceof Stopped)) throw e;
    writeErr(`skyfold: stopped after ${warped} of ${total - skipped} frames; nothing was written to ${opts.output} (finished segments are kept in ${parts.dir}: run the same command again to go on)\n`);
    setExitCode(130);
    return undefined;
  } finally {
    signal.dispose();
  }
  return {
    done: warped,
    skipped,
    failed: 0,
    failures: [],
    total,
    output: opts.output,
    seconds: (performance.now() - t0) / 1000,
    video: { size: [info.width, info.height], projector: [map.width, map.height], rate: formatRational(info.rate), codec: plan.codec, pixFmt: info.pixFmt, rotation: info.rotation },
    segments: { count: segs.count, frames: segs.framesPerSegment, mine: mine.length, warped: todo.length, joined: !opts.shard, parts: opts.shard ? parts.dir : undefined },
  };
}

function refuseInputAsOutput(output: string, input: string, named: string): void {
  try {
    const a = statSync(output);
    const b = statSync(input);
    if (a.dev === b.dev && a.ino === b.ino) throw new UserError(`${named}: is the input video; write the warped video to another file`);
  } catch (e) {
    if (e instanceof UserError) throw e;
  }
}

/**
 * The streams carried over must fit the output's container; a container that refuses one says so
 * before any frame is warped: ffmpeg writes just the header of a file holding only those streams.
 */
async function checkCarried(tools: VideoTools, info: VideoInfo, plan: EncodePlan, carry: CarryPlan, named: string): Promise<void> {
  if (carry.streams.length === 0) return;
  const args = ['-v', 'error', '-nostdin', '-i', info.path, ...carry.streams.flatMap((i) => ['-map', `0:${i}`]), '-c', 'copy', '-t', '0', '-f', plan.muxer, '-y', devNull];
  const r = await runToEnd(tools.ffmpeg, args);
  if (r.code !== 0) throw new UserError(`${named}: ffmpeg could not write the video: ${firstLineOf(r.stderr) || `exit ${r.code}`}`);
}

function firstLineOf(text: string): string {
  const line = text.split('\n').map((l) => l.trim()).find(Boolean) ?? '';
  return line.replace(/^(\[[^\]]* @ 0x[0-9a-f]+\]\s*)+/, '');
}

interface SegmentJob {
  tools: VideoTools;
  info: VideoInfo;
  map: RemapMap;
  filter: RemapFilter;
  pixFmt: 'rgb24' | 'rgb48le';
  plan: EncodePlan;
  segs: SegmentPlan;
  parts: PartsFolder;
  todo: number[];
  output: string;
  progress: boolean;
}

/**
 * One decoder for each run of consecutive segments to make (seeking to its first frame, so the finished
 * segments between two runs are not decoded again), one encoder per segment; returns the frames warped.
 */
async function warpSegments(job: SegmentJob, signal: StopSignal, onFrames: (n: number) => void): Promise<number> {
  const { info, map, segs, todo } = job;
  if (todo.length === 0) return 0;
  const bps = job.pixFmt === 'rgb48le' ? 2 : 1;
  const { bytes: inBuf, image: src } = rgbFrame(info.width, info.height, bps);
  const { bytes: outBuf, image: out } = rgbFrame(map.width, map.height, bps);
  const stderr = runContext().stderr;
  const progress = new Progress(todo.reduce((s, k) => s + segmentFrames(segs, k)[1] - segmentFrames(segs, k)[0], 0), stderr, job.progress && Boolean(stderr.isTTY));
  const stopped = signal.stopped.then(() => STOPPED);
  let decoder: Running | undefined;
  let encoder: Running | undefined;
  let temp: string | undefined;
  let warped = 0;
  const planScratch = {};
  try {
    for (const run of contiguousRuns(todo)) {
      const first = segmentFrames(segs, run[0])[0];
      const end = segmentFrames(segs, run[run.length - 1])[1];
      const dec = start(job.tools.ffmpeg, decodeArgs(info, job.pixFmt, first), 'ignore');
      decoder = dec;
      let n = first;
      const reader = new FrameReader(dec.child.stdout!, inBuf.length);
      /** Reads frame n into inBuf, failing the run on a decoder that stops early or reports damage. */
      const read = async (): Promise<void> => {
        const more = await Promise.race([reader.next(inBuf).catch((e: unknown) => (e instanceof TruncatedFrame ? false : Promise.reject(e))), stopped]);
        if (more === STOPPED || signal.stopping) throw new Stopped();
        // ffmpeg conceals a damaged packet and carries on; any error it reports fails the run instead
        if (dec.stderr.text) throw damaged(info, n, dec.stderr.firstLine);
        if (more !== true) {
          const dcode = await dec.exited;
          if (dec.stderr.text) throw damaged(info, n, dec.stderr.firstLine);
          if (dcode !== 0) throw sourceError(`${info.path}: decoding failed at frame ${n + 1} of ${info.frameCount}: ${dec.stderr.firstLine || `exit ${dcode}`}`);
          throw sourceError(`${info.path}: got ${n} of ${info.frameCount} frames: frames ${n + 1}-${info.frameCount} did not decode (a damaged stream?); nothing was written`);
        }
      };
      for (const k of run) {
        const [a, b] = segmentFrames(segs, k);
        temp = join(job.parts.dir, `${segmentName(k)}${partialTag(hostTag())}tmp`);
        encoder = start(job.tools.ffmpeg, segmentEncodeArgs(job, temp), 'pipe');
        const sink = encoder.child.stdin!;
        sink.on('error', () => {}); // a closed pipe is reported from the encoder's exit below
        // the encoder may stop early (a full disk): every wait below also ends then
        const encoderGone = encoder.exited.then(() => GONE);
        const t = performance.now();
        for (; n < b; n++) {
          await read();
          remap(src, map, { filter: job.filter, out, areaPlan: areaPlanFor(src, map, job.filter, planScratch) });
          const wrote = await Promise.race([writeFlushed(sink, outBuf).catch(() => GONE), encoderGone, stopped]);
          if (wrote === STOPPED || signal.stopping) throw new Stopped();
          if (wrote === GONE) break;
          onFrames(++warped);
          progress.tick(String(n + 1), true);
        }
        sink.end();
        const ecode = await encoder.exited;
        if (ecode !== 0 || n < b) throw new UserError(`${job.output}: ffmpeg could not write the video: ${encoder.stderr.firstLine || `exit ${ecode}`}`);
        renameSync(temp, join(job.parts.dir, segmentName(k)));
        temp = undefined;
        encoder = undefined;
        recordSegment(job.parts.dir, { segment: k, frames: b - a, seconds: (performance.now() - t) / 1000 });
      }
      if (end < info.frameCount) stop(dec);
      else {
        // the whole rest of the video was read: it must end here, cleanly
        const extra = await Promise.race([reader.next(inBuf).catch(() => false), stopped]);
        if (extra === STOPPED) throw new Stopped();
        if (extra === true) throw sourceError(`${info.path}: got more than its ${info.frameCount} frames; nothing was written`);
        const dcode = await dec.exited;
        if (dec.stderr.text) throw damaged(info, n, dec.stderr.firstLine);
        if (dcode !== 0) throw sourceError(`${info.path}: decoding failed at frame ${n + 1} of ${info.frameCount}: ${dec.stderr.firstLine || `exit ${dcode}`}`);
      }
      await dec.exited;
      decoder = undefined;
    }
    progress.finish();
    return warped;
  } catch (e) {
    stop(decoder);
    stop(encoder);
    await Promise.all([decoder?.exited, encoder?.exited]);
    if (temp) rmSync(temp, { force: true });
    progress.finish();
    throw e;
  }
}

/** ffmpeg arguments that encode one segment's raw frames, video only, into `temp`. */
function segmentEncodeArgs(job: SegmentJob, temp: string): string[] {
  const size = `${job.map.width}x${job.map.height}`;
  return ['-v', 'error', '-nostdin', '-y', '-f', 'rawvideo', '-pix_fmt', job.pixFmt, '-video_size', size, '-framerate', formatRational(job.info.rate), '-i', 'pipe:0', ...job.plan.args, '-f', 'nut', temp];
}

/**
 * Joins every segment (stream copy) with the source's other streams into the output, under a
 * temporary name renamed when the whole video is there, then removes the parts folder.
 */
async function joinSegments(job: SegmentJob, carry: CarryPlan, output: string, signal: StopSignal): Promise<void> {
  const { info, segs, parts } = job;
  for (let k = 0; k < segs.count; k++) {
    if (!existsSync(join(parts.dir, segmentName(k)))) throw new UserError(`${job.output}: segment ${k + 1} of ${segs.count} is missing from ${parts.dir}; run again to make it`);
  }
  const list = join(parts.dir, 'concat.txt');
  writeFileAtomic(list, concatList(segs, info.rate));
  const temp = join(dirname(output), `.${basename(output)}${partialTag(hostTag())}tmp`);
  const args = ['-v', 'error', '-nostdin', '-y'];
  // times as in the source: ffmpeg starts each input at zero, so the frames are placed after the
  // file's earliest stream and the whole output moved to the file's start (an output offset:
  // -itsoffset alone lands half a frame off in Matroska)
  const lead = info.startTime - info.fileStart;
  if (lead > 0) args.push('-itsoffset', String(lead));
  args.push('-f', 'concat', '-safe', '0', '-i', list, '-i', info.path, '-map', '0:v', ...carry.args, '-c:v', 'copy', ...job.plan.containerArgs);
  if (info.fileStart !== 0) args.push('-output_ts_offset', String(info.fileStart));
  args.push('-f', job.plan.muxer, temp);
  const joiner = start(job.tools.ffmpeg, args, 'ignore');
  try {
    const code = await Promise.race([joiner.exited, signal.stopped.then(() => STOPPED)]);
    if (code === STOPPED) throw new Stopped();
    if (code !== 0) throw new UserError(`${job.output}: ffmpeg could not write the video: ${joiner.stderr.firstLine || `exit ${String(code)}`}`);
    const count = await countFrames(job.tools, temp);
    if (count !== info.frameCount) throw new UserError(`${job.output}: the joined video holds ${count} of ${info.frameCount} frames; nothing was written`);
    renameSync(temp, output);
  } catch (e) {
    stop(joiner);
    await joiner.exited;
    rmSync(temp, { force: true });
    throw e;
  }
  rmSync(parts.dir, { recursive: true, force: true });
}

/** The frames (packets) of a file's first video stream, counted by ffprobe. */
async function countFrames(tools: VideoTools, path: string): Promise<number> {
  const r = await runToEnd(tools.ffprobe, ['-v', 'error', '-select_streams', 'v:0', '-count_packets', '-show_entries', 'stream=nb_read_packets', '-of', 'csv=p=0', path]);
  return Number.parseInt(r.stdout.trim(), 10);
}
