/**
 * Raw video pipes: frames of packed RGB (8-bit, or 16-bit little-endian) on standard input, warped
 * frames in the same layout on standard output, so skyfold can sit between two ffmpeg processes.
 */
import { remap, type RemapFilter } from '@skyfold/warp-core';
import { areaPlanFor, preparedFor } from './job.js';
import { UserError } from '../errors.js';
import { runContext } from '../io/run-context.js';
import type { MapSettings, MapSource } from './map-source.js';
import { DEFAULT_MAX_PIXELS } from '../io/image-codec.js';
import { rgbFrame, writeFlushed } from '../video/frame-stream.js';

export interface RawSpec {
  width: number;
  height: number;
  format: 'rgb24' | 'rgb48le';
}

/** Parses WxH[:fmt]; a frame of more than `maxPixels` is refused (the same bound as --max-pixels for files). */
export function parseRawSpec(text: string, maxPixels = DEFAULT_MAX_PIXELS): RawSpec {
  const m = /^(\d{1,9})x(\d{1,9})(?::(rgb24|rgb48le))?$/.exec(text.trim());
  const shown = text.length > 40 ? text.slice(0, 39) + '…' : text;
  if (!m || Number(m[1]) < 1 || Number(m[2]) < 1) throw new UserError(`--raw-in: expected WxH or WxH:rgb24 or WxH:rgb48le, got "${shown}"`);
  const width = Number(m[1]);
  const height = Number(m[2]);
  if (width * height > maxPixels) throw new UserError(`--raw-in: a ${width}x${height} frame is more than ${maxPixels} pixels (raise --max-pixels if it is meant)`);
  return { width, height, format: (m[3] as RawSpec['format']) ?? 'rgb24' };
}

/** Reads exactly-sized frames from a stream as they arrive. */
async function* rawFrames(stream: NodeJS.ReadableStream, frameBytes: number): AsyncGenerator<Buffer> {
  let pending: Buffer[] = [];
  let have = 0;
  for await (const chunk of stream as AsyncIterable<Buffer>) {
    pending.push(chunk);
    have += chunk.length;
    while (have >= frameBytes) {
      const all = Buffer.concat(pending, have);
      yield all.subarray(0, frameBytes);
      const rest = all.subarray(frameBytes);
      pending = rest.length ? [Buffer.from(rest)] : [];
      have = rest.length;
    }
  }
  if (have > 0) throw new UserError(`--raw-in: standard input ended inside a frame (${have} of ${frameBytes} bytes)`);
}

/** The reader of standard output went away (`| head -c 1000`): a normal end of the pipe, not a failure. */
function isClosedPipe(e: unknown): boolean {
  const code = (e as NodeJS.ErrnoException)?.code;
  return code === 'EPIPE' || code === 'ERR_STREAM_DESTROYED' || code === 'ERR_STREAM_WRITE_AFTER_END';
}

export interface RawStreams {
  input: NodeJS.ReadableStream;
  output: NodeJS.WritableStream;
  log: NodeJS.WritableStream;
}

export async function runRawPipe(
  source: MapSource,
  s: MapSettings,
  spec: RawSpec,
  filter: RemapFilter,
  streams: RawStreams = { input: runContext().stdin, output: runContext().stdout, log: runContext().stderr },
): Promise<void> {
  const map = source.build([spec.width, spec.height], s);
  const bps = spec.format === 'rgb48le' ? 2 : 1;
  const frameBytes = spec.width * spec.height * 3 * bps;
  const { bytes: outBuf, image: out } = rgbFrame(map.width, map.height, bps);
  const { bytes: inAligned, image: src } = rgbFrame(spec.width, spec.height, bps);
  let frames = 0;
  const scratch = {};
  let readerGone = false;
  // an EPIPE also arrives as an 'error' event; without a listener it would end the process
  const onError = (e: unknown) => {
    if (isClosedPipe(e)) readerGone = true;
  };
  streams.output.on('error', onError);
  try {
    for await (const frame of rawFrames(streams.input, frameBytes)) {
      frame.copy(inAligned); // aligned copy: 16-bit samples are read in place (little-endian hosts)
      remap(src, map, { filter, out, prepared: preparedFor(src, map, filter, scratch), areaPlan: areaPlanFor(src, map, filter, scratch) });
      try {
        await writeFlushed(streams.output, outBuf); // rejects with EPIPE when the reader left
      } catch (e) {
        if (!isClosedPipe(e)) throw e;
        readerGone = true;
      }
      if (readerGone) break;
      frames++;
    }
  } finally {
    // once the reader is gone more EPIPE events may follow: keep listening so none ends the process
    if (!readerGone) streams.output.removeListener('error', onError);
  }
  const why = readerGone ? '; the reader closed the pipe' : '';
  streams.log.write(`skyfold: warped ${frames} raw frames ${spec.width}x${spec.height} -> ${map.width}x${map.height} (${spec.format})${why}\n`);
}
