/**
 * Everything but the warped picture goes across untouched: sound, subtitles, data (timecode)
 * and attachments are stream-copied from the source, with the file's and each stream's metadata
 * and the chapters. Streams the output container cannot hold are named and left out.
 */
import type { OtherStream, VideoInfo } from './probe.js';

/** Subtitle codecs each container stores as they are (ffmpeg's muxers' codec tables). */
const SUBTITLES: Readonly<Record<string, readonly string[]>> = {
  mp4: ['mov_text'],
  mov: ['mov_text'],
  matroska: ['subrip', 'ass', 'ssa', 'webvtt', 'hdmv_pgs_subtitle', 'dvd_subtitle', 'dvb_subtitle', 'text'],
  webm: ['webvtt'],
  avi: [],
};

/** Why `s` cannot go into a `muxer` file as it is, or undefined when it can. */
function refusal(s: OtherStream, muxer: string): string | undefined {
  switch (s.type) {
    case 'audio':
      return undefined; // every container takes sound; a codec it cannot hold is ffmpeg's error, shown as is
    case 'subtitle':
      return (SUBTITLES[muxer] ?? []).includes(s.codec) ? undefined : `${muxer} files cannot hold ${s.codec} subtitles`;
    case 'data':
      return muxer === 'mov' ? undefined : `only .mov files hold data streams`;
    case 'attachment':
      return muxer === 'matroska' ? undefined : `only .mkv files hold attachments`;
    case 'video':
      return 'only the first picture stream is warped';
  }
}

export interface CarryPlan {
  /** ffmpeg arguments that map and copy the source's other streams (the source is input 1, the warped frames input 0). */
  args: string[];
  /** One line per stream left out, for a warning. */
  dropped: string[];
  /** The source's indices of the streams carried. */
  streams: number[];
}

export function planCarry(info: VideoInfo, muxer: string): CarryPlan {
  const args = ['-map_metadata', '1', '-map_chapters', '1', '-map_metadata:s:0', `1:s:${info.videoIndex}`];
  // the warped frames are shown upright: no rotation carried over from the source's picture
  if (info.rotation !== 0) args.push('-metadata:s:0', 'rotate=0');
  const dropped: string[] = [];
  const streams: number[] = [];
  let k = 1;
  for (const s of info.others) {
    // a timecode track travels as the picture's timecode tag (mapped above; the .mov muxer writes
    // its track again), and a QuickTime chapter text track as the chapters
    if (s.type === 'data' && (s.codec === 'tmcd' || s.codec === 'bin_data')) continue;
    const why = refusal(s, muxer);
    if (why) {
      dropped.push(`stream ${s.index} (${s.type}, ${s.codec}): ${why}`);
      continue;
    }
    args.push('-map', `1:${s.index}`, `-map_metadata:s:${k}`, `1:s:${s.index}`, `-c:${k}`, 'copy');
    streams.push(s.index);
    k++;
  }
  return { args, dropped, streams };
}
