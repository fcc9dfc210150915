/**
 * Sound and the rest carried over: a warped video keeps the source's audio, subtitle and data
 * streams packet for packet, its file and stream metadata and its chapters. Skipped, saying so,
 * where ffmpeg is not installed.
 */
import { existsSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { ffmpeg, ffprobe, packetHashes, partials, setUpVideoWork, skyfold, streamField, TOOLS } from './video-fixtures.js';

let work: string;
let rig: string;
let source: string;

beforeAll(() => {
  ({ work, rig } = setUpVideoWork('carry'));
  if (!TOOLS) return;
  const subs = join(work, 'subs.srt');
  writeFileSync(subs, '1\n00:00:00,000 --> 00:00:00,200\nzenith\n\n2\n00:00:00,200 --> 00:00:00,400\nspringline\n');
  const chapters = join(work, 'chapters.txt');
  writeFileSync(chapters, ';FFMETADATA1\ntitle=first light\n[CHAPTER]\nTIMEBASE=1/1000\nSTART=0\nEND=200\ntitle=dusk\n[CHAPTER]\nTIMEBASE=1/1000\nSTART=200\nEND=400\ntitle=night\n');
  source = join(work, 'show.mov');
  // a show as it arrives: picture, two sound tracks in two languages, subtitles, a timecode track, chapters
  ffmpeg([
    '-f', 'lavfi', '-i', 'testsrc=size=64x64:rate=25',
    '-f', 'lavfi', '-i', 'sine=frequency=440:sample_rate=48000',
    '-f', 'lavfi', '-i', 'sine=frequency=660:sample_rate=44100',
    '-i', subs, '-i', chapters,
    '-t', '0.4', '-map', '0:v', '-map', '1:a', '-map', '2:a', '-map', '3:s', '-map_metadata', '4', '-map_chapters', '4',
    '-c:v', 'libx264', '-c:a', 'aac', '-c:s', 'mov_text',
    '-metadata:s:a:0', 'language=eng', '-metadata:s:a:1', 'language=fra', '-metadata:s:s:0', 'language=deu',
    '-metadata:s:v:0', 'timecode=01:00:00:00', '-metadata', 'comment=made for the carry test',
    source,
  ]);
});

function tags(path: string): { format: Record<string, string>; streams: { codec_type: string; tags?: Record<string, string> }[]; chapters: { tags?: Record<string, string> }[] } {
  return JSON.parse(ffprobe(['-print_format', 'json', '-show_format', '-show_streams', '-show_chapters', path])) as never;
}

describe.skipIf(!TOOLS)('carrying the other streams', () => {
  it('copies sound, subtitles and timecode into a .mov untouched, with the metadata and chapters', async () => {
    const out = join(work, 'warped.mov');
    const r = await skyfold(['warp', rig, source, '-o', out, '--json']);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    for (const s of ['a:0', 'a:1', 's:0']) expect(packetHashes(out, s)).toEqual(packetHashes(source, s));
    const a = tags(source);
    const b = tags(out);
    expect(b.streams.map((s) => s.codec_type)).toEqual(a.streams.map((s) => s.codec_type)); // video, audio, audio, subtitle, data
    expect(b.streams.map((s) => s.tags?.language)).toEqual(a.streams.map((s) => s.tags?.language));
    expect(b.streams[0].tags?.timecode).toBe('01:00:00:00');
    expect(streamField(out, 'codec_tag_string', 'd')).toContain('tmcd');
    expect(b.format.tags).toMatchObject({ title: 'first light', comment: 'made for the carry test' });
    expect(b.chapters.map((c) => c.tags?.title)).toEqual(['dusk', 'night']);
  });

  it('names the streams a .mkv cannot hold and carries the rest', async () => {
    const out = join(work, 'warped.mkv');
    const r = await skyfold(['warp', rig, source, '-o', out, '--json']);
    expect(r.code).toBe(0);
    expect(r.stderr).toBe(`skyfold: warning: ${source}: left out stream 3 (subtitle, mov_text): matroska files cannot hold mov_text subtitles\n`);
    for (const s of ['a:0', 'a:1']) expect(packetHashes(out, s)).toEqual(packetHashes(source, s));
    expect(tags(out).streams.map((s) => s.codec_type)).toEqual(['video', 'audio', 'audio']);
  });

  it('fails in one line when the container refuses the sound, writing nothing', async () => {
    const out = join(work, 'warped.webm');
    const r = await skyfold(['warp', rig, source, '-o', out]);
    expect(r.code).toBe(2);
    expect(r.stderr.split('\n').filter((l) => !l.includes('warning:'))).toEqual([expect.stringMatching(/^skyfold: .*warped\.webm: ffmpeg could not write the video: .*Vorbis or Opus audio.*/), '']);
    expect(existsSync(out)).toBe(false);
    expect(partials(work)).toEqual([]);
  });
});
