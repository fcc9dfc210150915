/** `skyfold warp RIG show.mp4 -o warped.mp4`: the video branch of the warp command. */
import type { RemapFilter } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { printJson } from '../format.js';
import { info } from '../messages.js';
import type { MapSettings, MapSource } from '../warp/map-source.js';
import { isVideoPath, VIDEO_EXTENSIONS, type VideoEncodeOptions } from './encode.js';
import type { VideoInput } from './recognise.js';
import { warpVideo } from './warp-video.js';

export interface VideoCommandOptions extends VideoEncodeOptions {
  output?: string;
  filter: RemapFilter;
  json?: boolean;
  shard?: [number, number];
  segmentSeconds?: number;
  overwrite?: boolean;
}

export async function runVideoWarp(video: VideoInput, map: MapSource, mapSettings: MapSettings, o: VideoCommandOptions): Promise<void> {
  if (!o.output) throw new UserError(`warp: give the output video with -o (a ${VIDEO_EXTENSIONS.join(' ')} file)`);
  if (!isVideoPath(o.output)) throw new UserError(`-o ${o.output}: a video warps to a video file: name it ${VIDEO_EXTENSIONS.join(' ')}`);
  const summary = await warpVideo(video.tools, map, mapSettings, video.info, { ...o, output: o.output, progress: !o.json });
  if (!summary) return; // stopped by a signal
  if (o.json) printJson(summary);
  else {
    const v = summary.video;
    const g = summary.segments;
    const already = summary.skipped > 0 ? `, ${summary.skipped} already done` : '';
    const where = g.joined ? summary.output : `${g.parts} (segments of shard ${o.shard!.join('/')}; a plain run joins them into ${summary.output})`;
    info(`${summary.done} frames warped${already} (${v.size.join('x')} at ${v.rate} fps -> ${v.projector.join('x')} ${v.codec}) in ${summary.seconds.toFixed(1)} s -> ${where}`);
  }
}
