/**
 * How a warped video is written: the container from the output's extension, the codec (a default
 * per container), its quality settings and the colour tags, as ffmpeg arguments.
 */
import { extname } from 'node:path';
import { UserError } from '../errors.js';
import type { VideoColour } from './probe.js';

export const VIDEO_CODECS = ['h264', 'hevc', 'prores', 'ffv1', 'vp9'] as const;
export type VideoCodec = (typeof VIDEO_CODECS)[number];

interface Container {
  muxer: string;
  codec: VideoCodec;
  codecs: readonly VideoCodec[];
}

/** Output containers by extension; the default codecs are the (H.264 in .mp4, ProRes 422 HQ in .mov). */
const CONTAINERS: Readonly<Record<string, Container>> = {
  '.mp4': { muxer: 'mp4', codec: 'h264', codecs: ['h264', 'hevc', 'vp9'] },
  '.mov': { muxer: 'mov', codec: 'prores', codecs: ['prores', 'h264', 'hevc', 'ffv1'] },
  '.mkv': { muxer: 'matroska', codec: 'h264', codecs: ['h264', 'hevc', 'prores', 'ffv1', 'vp9'] },
  '.webm': { muxer: 'webm', codec: 'vp9', codecs: ['vp9'] },
  '.avi': { muxer: 'avi', codec: 'h264', codecs: ['h264', 'ffv1'] },
};

export const VIDEO_EXTENSIONS: readonly string[] = Object.keys(CONTAINERS);

export function isVideoPath(path: string): boolean {
  return extname(path).toLowerCase() in CONTAINERS;
}

/** Codec settings a user may give; each default lives here. */
export interface VideoEncodeOptions {
  codec?: VideoCodec;
  crf?: number;
  preset?: string;
}

/** x264's and x265's default-quality choice for masters kept for playback: CRF 18, preset medium (common practice). */
export const VIDEO_ENCODE_DEFAULTS = { crf: 18, preset: 'medium', vp9Crf: 24 } as const;

const X26X_PRESETS = ['ultrafast', 'superfast', 'veryfast', 'faster', 'fast', 'medium', 'slow', 'slower', 'veryslow', 'placebo'];

/** ffprobe's color_space names → the scale filter's matrix names (ffmpeg's vf_scale documentation). */
const SCALE_MATRIX: Readonly<Record<string, string>> = {
  bt709: 'bt709',
  smpte170m: 'smpte170m',
  bt470bg: 'bt470',
  bt2020nc: 'bt2020',
  bt2020c: 'bt2020',
  smpte240m: 'smpte240m',
  fcc: 'fcc',
};

/**
 * The YCbCr matrix a source was encoded with: its own tag, else BT.709 for HD and larger and
 * BT.601 (SMPTE 170M) below 720 lines (ITU-R BT.709 is the HD standard; untagged SD is BT.601 by common practice).
 */
export function sourceMatrix(colour: VideoColour, height: number): string {
  if (colour.space && colour.space in SCALE_MATRIX) return colour.space;
  return height >= 720 ? 'bt709' : 'smpte170m';
}

export function scaleMatrixName(space: string): string {
  return SCALE_MATRIX[space] ?? 'bt709';
}

export interface EncodePlan {
  muxer: string;
  codec: VideoCodec;
  /** ffmpeg arguments that encode the frames: video filter, codec, settings, colour tags. */
  args: string[];
  /** ffmpeg arguments for the final container only (its codec tag, where the index goes). */
  containerArgs: string[];
}

/**
 * The encoder's settings for `output`. `colour` is the source's (carried over where it says
 * something, BT.709 otherwise); `deep` is true when frames travel as 16-bit RGB.
 */
export function planEncode(output: string, o: VideoEncodeOptions, colour: VideoColour, deep: boolean): EncodePlan {
  const ext = extname(output).toLowerCase();
  const container = CONTAINERS[ext];
  if (!container) throw new UserError(`${output}: a video is written as ${VIDEO_EXTENSIONS.join(' ')}`);
  const codec = o.codec ?? container.codec;
  if (!container.codecs.includes(codec)) throw new UserError(`--codec ${codec}: not for ${ext} files; ${ext} takes ${container.codecs.join(', ')}`);
  const takesCrf = codec === 'h264' || codec === 'hevc' || codec === 'vp9';
  if (o.crf !== undefined && !takesCrf) throw new UserError(`--crf: ${codec} has no CRF (it applies to h264, hevc and vp9)`);
  if (o.preset !== undefined && codec !== 'h264' && codec !== 'hevc') throw new UserError(`--preset: ${codec} has no presets (they apply to h264 and hevc)`);
  const crfMax = codec === 'vp9' ? 63 : 51; // x264 and x265 take 0-51, libvpx-vp9 0-63 (their documentation)
  if (o.crf !== undefined && !(o.crf >= 0 && o.crf <= crfMax)) throw new UserError(`--crf: ${codec} takes 0 to ${crfMax}, got ${o.crf}`);
  if (o.preset !== undefined && !X26X_PRESETS.includes(o.preset)) throw new UserError(`--preset: expected one of ${X26X_PRESETS.join(', ')}, got "${o.preset}"`);
  const crf = String(o.crf ?? (codec === 'vp9' ? VIDEO_ENCODE_DEFAULTS.vp9Crf : VIDEO_ENCODE_DEFAULTS.crf));
  const preset = o.preset ?? VIDEO_ENCODE_DEFAULTS.preset;
  const primaries = colour.primaries ?? 'bt709';
  const transfer = colour.transfer ?? 'bt709';
  const args: string[] = [];
  const containerArgs: string[] = [];
  if (codec === 'ffv1') {
    // lossless and RGB: the samples go in as they are, no matrix, no range squeeze
    args.push('-c:v', 'ffv1', '-level', '3', '-pix_fmt', deep ? 'rgb48le' : 'bgr0');
    args.push('-color_primaries', primaries, '-color_trc', transfer, '-colorspace', 'rgb', '-color_range', 'pc');
    return { muxer: container.muxer, codec, args, containerArgs: [] };
  }
  const space = colour.space && colour.space in SCALE_MATRIX ? colour.space : 'bt709';
  args.push('-vf', `scale=out_color_matrix=${scaleMatrixName(space)}:out_range=tv:flags=accurate_rnd+full_chroma_int`);
  if (codec === 'h264') args.push('-c:v', 'libx264', '-preset', preset, '-crf', crf, '-pix_fmt', 'yuv420p');
  else if (codec === 'hevc') {
    args.push('-c:v', 'libx265', '-preset', preset, '-crf', crf, '-pix_fmt', deep ? 'yuv420p10le' : 'yuv420p', '-x265-params', 'log-level=error');
    if (container.muxer === 'mp4' || container.muxer === 'mov') containerArgs.push('-tag:v', 'hvc1'); // Apple players want hvc1 (common practice)
  } else if (codec === 'prores') {
    // profile 3 = ProRes 422 HQ in ffmpeg's prores_ks; 'apl0' the vendor most players expect (common practice)
    args.push('-c:v', 'prores_ks', '-profile:v', '3', '-vendor', 'apl0', '-pix_fmt', 'yuv422p10le');
  } else args.push('-c:v', 'libvpx-vp9', '-crf', crf, '-b:v', '0', '-row-mt', '1', '-pix_fmt', 'yuv420p');
  args.push('-color_primaries', primaries, '-color_trc', transfer, '-colorspace', space, '-color_range', 'tv');
  if (container.muxer === 'mp4' || container.muxer === 'mov') containerArgs.push('-movflags', '+faststart');
  return { muxer: container.muxer, codec, args, containerArgs };
}
