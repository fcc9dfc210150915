/**
 * What a video holds, from ffprobe: size, exact frame rate, frame count, pixel format, colour
 * metadata, rotation and the other streams. Also how skyfold tells a video from a still image.
 */
import { UserError } from '../errors.js';
import { runToEnd } from './child.js';
import { formatRational, parseRational, type Rational } from './rational.js';
import type { VideoTools } from './tools.js';

export interface VideoColour {
  /** 'tv' (limited) or 'pc' (full), as ffprobe names them; undefined when the file does not say. */
  range?: 'tv' | 'pc';
  /** YCbCr matrix (ffprobe's color_space), e.g. 'bt709'. */
  space?: string;
  transfer?: string;
  primaries?: string;
}

export interface VideoInfo {
  path: string;
  /** ffprobe's format_name, e.g. 'mov,mp4,m4a,3gp,3g2,mj2'. */
  container: string;
  codec: string;
  /** Frame size as decoded and shown, after the rotation below. */
  width: number;
  height: number;
  /** Exact constant frame rate. */
  rate: Rational;
  /** Frames in the video stream (its packets, counted). */
  frameCount: number;
  /** Presentation time of the first frame, seconds. */
  startTime: number;
  pixFmt: string;
  /** Bits per sample of the source (8, 10, 12, 16). */
  bitDepth: number;
  /** True for an RGB pixel format (no YCbCr matrix involved). */
  rgb: boolean;
  colour: VideoColour;
  /** Degrees clockwise the player turns the coded picture to show it (0, 90, 180, 270). */
  rotation: number;
  /** The warped stream's index in the file. */
  videoIndex: number;
  /** Earliest start of any stream (the container's start time), seconds. */
  fileStart: number;
  /** The file's other streams, in file order: sound, subtitles, data, attachments, further pictures. */
  others: OtherStream[];
}

export interface OtherStream {
  index: number;
  type: 'audio' | 'subtitle' | 'data' | 'attachment' | 'video';
  codec: string;
}

interface ProbeStream {
  index: number;
  codec_type?: string;
  codec_name?: string;
  codec_tag_string?: string;
  width?: number;
  height?: number;
  pix_fmt?: string;
  r_frame_rate?: string;
  avg_frame_rate?: string;
  time_base?: string;
  bits_per_raw_sample?: string;
  color_range?: string;
  color_space?: string;
  color_transfer?: string;
  color_primaries?: string;
  disposition?: { attached_pic?: number };
  tags?: Record<string, string>;
  side_data_list?: { side_data_type?: string; rotation?: number }[];
}

interface ProbeOutput {
  streams?: ProbeStream[];
  format?: { format_name?: string; start_time?: string };
}

/** Single-picture formats ffprobe also opens; these are images, not videos. */
function isImageContainer(formatName: string): boolean {
  return formatName === 'image2' || formatName.endsWith('_pipe') || formatName === 'gif' || formatName === 'webp';
}

function known(value: string | undefined): string | undefined {
  return value && value !== 'unknown' && value !== 'unspecified' && value !== 'reserved' ? value : undefined;
}

/** Bits per sample from the pixel format's name (yuv420p10le → 10, rgb48le → 16), else the stream's own figure. */
export function bitDepthOf(pixFmt: string, bitsPerRawSample?: string): number {
  const raw = Number(bitsPerRawSample);
  if (Number.isInteger(raw) && raw > 0) return raw;
  if (/^(rgb|bgr)(48|a64)|^(rgba|bgra)64|^gray16|^ya16/.test(pixFmt)) return 16;
  const m = /p(\d+)(le|be)?$/.exec(pixFmt);
  return m ? Number(m[1]) : 8;
}

export function isRgbPixFmt(pixFmt: string): boolean {
  return /^(rgb|bgr|gbr|argb|abgr|rgba|bgra|0rgb|0bgr|rgb0|bgr0|x2rgb|x2bgr)/.test(pixFmt);
}

/** Clockwise display rotation: the display matrix's angle is counter-clockwise (ffprobe 5+), the old `rotate` tag clockwise. */
function rotationOf(s: ProbeStream): number {
  const side = s.side_data_list?.find((d) => typeof d.rotation === 'number');
  const deg = side ? -side.rotation! : Number(s.tags?.rotate ?? 0);
  const r = (((Math.round(deg / 90) * 90) % 360) + 360) % 360;
  return Number.isFinite(r) ? r : 0;
}

async function probeJson(tools: VideoTools, path: string): Promise<ProbeOutput | undefined> {
  const r = await runToEnd(tools.ffprobe, ['-v', 'error', '-print_format', 'json', '-show_streams', '-show_format', '--', path]);
  if (r.code !== 0) return undefined;
  try {
    return JSON.parse(r.stdout) as ProbeOutput;
  } catch {
    return undefined;
  }
}

/**
 * The first video stream's timestamps, sorted (decode order is not presentation order): the frame
 * count, the first frame's time and whether the frames sit on a constant-rate grid.
 */
async function scanFrames(tools: VideoTools, path: string, index: number): Promise<{ ticks: number[]; error: string }> {
  const r = await runToEnd(tools.ffprobe, ['-v', 'error', '-select_streams', String(index), '-show_entries', 'packet=pts,dts', '-of', 'csv=p=0', '--', path]);
  if (r.code !== 0) throw new UserError(`${path}: cannot read the video's packets: ${r.stderr.trim().split('\n').pop() ?? ''}`);
  const ts: number[] = [];
  for (const line of r.stdout.split('\n')) {
    if (!line.trim()) continue;
    const [pts, dts] = line.split(',');
    const t = Number(pts !== 'N/A' && pts !== '' ? pts : dts);
    ts.push(Number.isFinite(t) ? t : NaN);
  }
  const error = r.stderr.split('\n').map((l) => l.trim()).find(Boolean) ?? '';
  return { ticks: ts.sort((a, b) => a - b), error: error.replace(/^(\[[^\]]* @ 0x[0-9a-f]+\]\s*)+/, '') };
}

/**
 * Where the timestamps leave a constant-rate grid: the index of the first frame more than a quarter
 * of a frame off start + i/rate, or -1. Quarter-frame slack absorbs a millisecond time base's rounding.
 */
export function firstOffGrid(sortedTicks: number[], rate: Rational, timeBase: Rational): number {
  const ticksPerFrame = (rate.den * timeBase.den) / (rate.num * timeBase.num);
  const t0 = sortedTicks[0];
  for (let i = 0; i < sortedTicks.length; i++) {
    if (!(Math.abs(sortedTicks[i] - t0 - i * ticksPerFrame) <= ticksPerFrame / 4)) return i;
  }
  return -1;
}

/**
 * Probes `path`: a VideoInfo when it is a video (a moving-picture stream in a container, whatever
 * its extension), undefined when it is not (a still image, not a media file at all). A video that
 * skyfold cannot warp frame for frame (variable frame rate, no rate) is a UserError saying why.
 */
export async function probeVideo(tools: VideoTools, path: string): Promise<VideoInfo | undefined> {
  const p = await probeJson(tools, path);
  const container = p?.format?.format_name ?? '';
  if (!p || isImageContainer(container)) return undefined;
  const streams = p.streams ?? [];
  const v = streams.find((s) => s.codec_type === 'video' && !s.disposition?.attached_pic);
  if (!v || !v.width || !v.height) return undefined;
  const rate = parseRational(v.r_frame_rate) ?? parseRational(v.avg_frame_rate);
  if (!rate) throw new UserError(`${path}: the video stream gives no frame rate`);
  const timeBase = parseRational(v.time_base) ?? { num: 1, den: 90000 };
  const { ticks, error } = await scanFrames(tools, path, v.index);
  if (ticks.length === 0) throw new UserError(`${path}: the video stream holds no frames`);
  if (ticks.some(Number.isNaN)) throw new UserError(`${path}: some frames carry no timestamp; remux it first (ffmpeg -i IN -c copy OUT.mkv)`);
  const off = firstOffGrid(ticks, rate, timeBase);
  if (off >= 0) {
    const at = (ticks[off] * timeBase.num) / timeBase.den;
    // frames missing from a file ffprobe finds damaged: say so, not "variable frame rate"
    if (error) throw new UserError(`${path}: damaged stream from frame ${off + 1} on (frames missing before ${at.toFixed(3)} s): ${error}; nothing was written`);
    throw new UserError(
      `${path}: variable frame rate (frame ${off + 1} at ${at.toFixed(3)} s is off the ${formatRational(rate)} fps grid); ` +
        `skyfold keeps frames one for one at a constant rate: convert it first (ffmpeg -i IN -fps_mode cfr -r ${formatRational(rate)} OUT)`,
    );
  }
  const rotation = rotationOf(v);
  const turned = rotation === 90 || rotation === 270;
  const pixFmt = v.pix_fmt ?? 'unknown';
  const others: OtherStream[] = [];
  for (const s of streams) {
    const type = s.codec_type;
    if (s === v || (type !== 'audio' && type !== 'subtitle' && type !== 'data' && type !== 'attachment' && type !== 'video')) continue;
    others.push({ index: s.index, type, codec: s.codec_name ?? s.codec_tag_string ?? 'unknown' });
  }
  const startTime = (ticks[0] * timeBase.num) / timeBase.den;
  const fileStart = Number(p.format?.start_time);
  const range = known(v.color_range);
  return {
    path,
    container,
    codec: v.codec_name ?? 'unknown',
    width: turned ? v.height : v.width,
    height: turned ? v.width : v.height,
    rate,
    frameCount: ticks.length,
    startTime,
    pixFmt,
    bitDepth: bitDepthOf(pixFmt, v.bits_per_raw_sample),
    rgb: isRgbPixFmt(pixFmt),
    colour: {
      range: range === 'tv' || range === 'pc' ? range : undefined,
      space: known(v.color_space),
      transfer: known(v.color_transfer),
      primaries: known(v.color_primaries),
    },
    rotation,
    videoIndex: v.index,
    fileStart: Number.isFinite(fileStart) ? Math.min(fileStart, startTime) : startTime,
    others,
  };
}

