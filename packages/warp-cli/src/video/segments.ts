/**
 * A warped video is made in segments of a few seconds, each encoded on its own into a parts folder
 * beside the output and renamed into place only when complete; a rerun warps only the segments
 * that are missing, shards of a farm each take a block of them, and a plain run joins them
 * (stream copy) into the output.
 *
 * The parts folder, `NAME.skyfold-parts/` beside the output NAME:
 * - `plan.json`: what the parts are made of (source, map, settings, segment length). Parts made
 *   otherwise are not mixed in: a run with other settings starts the folder again.
 * - `segment-00001.nut` …: one per segment, video only (NUT keeps the exact frame timestamps and
 *   takes every codec skyfold writes); the sound and the rest come from the source at the join.
 * - `run.jsonl`: one line per finished segment (which, how many frames, where and how long), appended.
 */
import { createHash } from 'node:crypto';
import { closeSync, constants, existsSync, lstatSync, mkdirSync, openSync, readFileSync, readdirSync, rmSync, statSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { UserError } from '../errors.js';
import { writeFileAtomic } from '../io/output-file.js';
import { hostTag, removeStalePartials } from '../warp/output-folder.js';
import type { Rational } from './rational.js';

/** Segment length when none is given: short enough that a killed run loses little, long enough that starting an encoder per segment costs nothing (common practice for chunked encoding). */
export const DEFAULT_SEGMENT_SECONDS = 4;

export interface SegmentPlan {
  frameCount: number;
  framesPerSegment: number;
  count: number;
}

/** Cuts `frameCount` frames at `rate` into segments of about `seconds` (at least one frame each). */
export function planSegments(frameCount: number, rate: Rational, seconds: number): SegmentPlan {
  if (!(seconds > 0) || !Number.isFinite(seconds)) throw new UserError(`--segment: expected a positive number of seconds, got ${seconds}`);
  const framesPerSegment = Math.max(1, Math.round((seconds * rate.num) / rate.den));
  return { frameCount, framesPerSegment, count: Math.max(1, Math.ceil(frameCount / framesPerSegment)) };
}

/** Frames [first, end) of segment `k` (from 0). */
export function segmentFrames(plan: SegmentPlan, k: number): [number, number] {
  const first = k * plan.framesPerSegment;
  return [first, Math.min(plan.frameCount, first + plan.framesPerSegment)];
}

/**
 * The segments shard K of N takes: a contiguous block (so its decoder seeks once), the blocks of
 * all N shards together covering every segment once. Without a shard, all of them.
 */
export function shardSegments(plan: SegmentPlan, shard?: [number, number]): number[] {
  const [k, n] = shard ?? [1, 1];
  const from = Math.floor(((k - 1) * plan.count) / n);
  const to = Math.floor((k * plan.count) / n);
  return Array.from({ length: to - from }, (_, i) => from + i);
}

export function segmentName(k: number): string {
  return `segment-${String(k + 1).padStart(5, '0')}.nut`;
}

export function partsFolderOf(output: string): string {
  return join(dirname(output), `${basename(output)}.skyfold-parts`);
}

export interface PartsFolder {
  dir: string;
  /** Segments found finished (from 0). */
  done: Set<number>;
  /** True when the folder held parts made otherwise, now removed. */
  restarted: boolean;
}

/**
 * Opens (or makes) the parts folder for `identity` (a text naming everything the frames depend
 * on). Parts of another identity, and temporaries of this machine's dead runs, are removed;
 * `overwrite` removes every part.
 */
export function openPartsFolder(output: string, identity: string, plan: SegmentPlan, overwrite: boolean): PartsFolder {
  const dir = partsFolderOf(output);
  let link = false;
  try {
    link = lstatSync(dir).isSymbolicLink();
  } catch {
    // not there yet
  }
  if (link) throw new UserError(`${dir}: the parts folder is a symbolic link; skyfold does not write through links (remove it)`);
  try {
    mkdirSync(dir, { recursive: true });
  } catch (e) {
    throw new UserError(`${dir}: cannot create the parts folder: ${(e as Error).message}`);
  }
  if (!statSync(dir).isDirectory()) throw new UserError(`${dir}: is not a folder (skyfold keeps a video's finished segments there)`);
  removeStalePartials(dir, hostTag());
  const key = createHash('sha256').update(identity).digest('hex');
  const planPath = join(dir, 'plan.json');
  let restarted = false;
  let theirs: { key?: string } | undefined;
  try {
    theirs = JSON.parse(readFileSync(planPath, 'utf8')) as { key?: string };
  } catch {
    theirs = undefined;
  }
  if (overwrite || (theirs && theirs.key !== key) || !theirs) {
    if (theirs && theirs.key !== key) restarted = true;
    // finished segments only: a temporary belongs to a run that may still be going (another shard)
    for (const n of readdirSync(dir)) if (/^segment-\d+\.nut$/.test(n) || n === 'run.jsonl') rmSync(join(dir, n), { force: true });
  }
  if (!theirs || theirs.key !== key) {
    writeFileAtomic(planPath, JSON.stringify({ key, framesPerSegment: plan.framesPerSegment, frameCount: plan.frameCount, segments: plan.count }, null, 1) + '\n');
  }
  const done = new Set<number>();
  for (let k = 0; k < plan.count; k++) if (existsSync(join(dir, segmentName(k)))) done.add(k);
  return { dir, done, restarted };
}

/** Appends one line to the parts folder's run log (short appends are atomic, so shards may share it). */
export function recordSegment(dir: string, entry: { segment: number; frames: number; seconds: number }): void {
  const fd = openSync(join(dir, 'run.jsonl'), constants.O_WRONLY | constants.O_APPEND | constants.O_CREAT | constants.O_NOFOLLOW, 0o644);
  try {
    writeSync(fd, JSON.stringify({ ...entry, segment: entry.segment + 1, host: hostTag(), pid: process.pid }) + '\n');
  } finally {
    closeSync(fd);
  }
}

/**
 * The concat demuxer's list of every segment, in order (names relative to the list), each with its
 * duration: a segment file does not hold its last frame's duration, and without it the next
 * segment would start one frame early. Durations are taken between exact start times rounded to
 * the microsecond (what the list can say), so rounding does not add up along a long show.
 */
export function concatList(plan: SegmentPlan, rate: Rational): string {
  const startUs = (frame: number) => Math.round((frame * rate.den * 1e6) / rate.num);
  let text = 'ffconcat version 1.0\n';
  for (let k = 0; k < plan.count; k++) {
    const [a, b] = segmentFrames(plan, k);
    const us = startUs(b) - startUs(a);
    text += `file '${segmentName(k)}'\nduration ${Math.floor(us / 1e6)}.${String(us % 1e6).padStart(6, '0')}\n`;
  }
  return text;
}

/** The segments to make as runs of consecutive ones: each run gets a decoder of its own, seeking to its start. */
export function contiguousRuns(todo: readonly number[]): number[][] {
  const runs: number[][] = [];
  for (const k of todo) {
    const last = runs[runs.length - 1];
    if (last && last[last.length - 1] === k - 1) last.push(k);
    else runs.push([k]);
  }
  return runs;
}
