/** Telling a video input from frames: by extension where it is plain, by probing where it is not. */
import { statSync } from 'node:fs';
import { basename, extname } from 'node:path';
import { UserError } from '../errors.js';
import { IMAGE_EXTENSIONS } from '../warp/inputs.js';
import { isVideoPath } from './encode.js';
import { probeVideo, type VideoInfo } from './probe.js';
import { findVideoTools, tryVideoTools, type VideoTools } from './tools.js';

export interface VideoInput {
  tools: VideoTools;
  info: VideoInfo;
}

/** Input extensions that name a video even when skyfold does not write them. */
const READ_ONLY_VIDEO_EXTENSIONS = ['.m4v', '.mxf', '.ts', '.mts', '.m2ts', '.mpg', '.mpeg', '.ogv', '.flv', '.wmv'];

function namesVideo(path: string): boolean {
  return isVideoPath(path) || READ_ONLY_VIDEO_EXTENSIONS.includes(extname(path).toLowerCase());
}

/**
 * The video among `inputs`, or undefined when they are frames. A file named like a video needs
 * ffmpeg (a UserError saying how to install it when absent); a file with an unknown extension is
 * probed when ffmpeg is at hand and otherwise left to the image reader.
 */
export async function recogniseVideo(inputs: string[], ffmpegOption: string | undefined): Promise<VideoInput | undefined> {
  const named = inputs.filter(namesVideo);
  if (inputs.length !== 1) {
    if (named.length > 0) throw new UserError(`${named[0]}: warp one video per run (got ${inputs.length} inputs)`);
    return undefined;
  }
  const input = inputs[0];
  if (/%0?\d*d/.test(basename(input)) || IMAGE_EXTENSIONS.includes(extname(input).toLowerCase())) return undefined;
  try {
    if (!statSync(input).isFile()) return undefined;
  } catch {
    return undefined; // reported by the frame reader: no such file
  }
  if (named.length === 1) {
    const tools = findVideoTools(ffmpegOption);
    const info = await probeVideo(tools, input);
    if (!info) throw new UserError(`${input}: not a video (ffprobe finds no video stream in it)`);
    return { tools, info };
  }
  const tools = tryVideoTools(ffmpegOption);
  if (!tools) return undefined;
  const info = await probeVideo(tools, input);
  return info ? { tools, info } : undefined;
}

