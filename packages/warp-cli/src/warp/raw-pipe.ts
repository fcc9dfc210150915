/**
 * Raw video pipes: frames of packed RGB (8-bit, or 16-bit little-endian) on standard input, warped
 * frames in the same layout on standard output, so skyfold can sit between two ffmpeg processes.
 */
import { remap, type ImageBuffer, type RemapFilter } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import type { MapSettings, MapSource } from './map-source.js';

export interface RawSpec {
  width: number;
  height: number;
  format: 'rgb24' | 'rgb48le';
}

export function parseRawSpec(text: string): RawSpec {
  const m = /^(\d+)x(\d+)(?::(rgb24|rgb48le))?$/.exec(text.trim());
  if (!m || Number(m[1]) < 1 || Number(m[2]) < 1) throw new UserError(`--raw-in: expected WxH or WxH:rgb24 or WxH:rgb48le, got "${text}"`);
  return { width: Number(m[1]), height: Number(m[2]), format: (m[3] as RawSpec['format']) ?? 'rgb24' };
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

function write(stream: NodeJS.WritableStream, bytes: Uint8Array): Promise<void> {
  return new Promise((resolve, reject) => {
    if (stream.write(bytes)) resolve();
    else {
      stream.once('drain', resolve);
      stream.once('error', reject);
    }
  });
}

export async function runRawPipe(source: MapSource, s: MapSettings, spec: RawSpec, filter: RemapFilter): Promise<void> {
  const map = source.build([spec.width, spec.height], s);
  const bps = spec.format === 'rgb48le' ? 2 : 1;
  const frameBytes = spec.width * spec.height * 3 * bps;
  const outBytes = map.width * map.height * 3 * bps;
  const outBuf = Buffer.alloc(outBytes);
  const out: ImageBuffer = {
    width: map.width,
    height: map.height,
    channels: 3,
    data: bps === 2 ? new Uint16Array(outBuf.buffer, outBuf.byteOffset, outBytes / 2) : new Uint8Array(outBuf.buffer, outBuf.byteOffset, outBytes),
  };
  const inAligned = Buffer.alloc(frameBytes);
  const src: ImageBuffer = {
    width: spec.width,
    height: spec.height,
    channels: 3,
    data: bps === 2 ? new Uint16Array(inAligned.buffer, inAligned.byteOffset, frameBytes / 2) : new Uint8Array(inAligned.buffer, inAligned.byteOffset, frameBytes),
  };
  let frames = 0;
  for await (const frame of rawFrames(process.stdin, frameBytes)) {
    frame.copy(inAligned); // aligned copy: 16-bit samples are read in place (little-endian hosts)
    remap(src, map, { filter, out });
    await write(process.stdout, outBuf);
    frames++;
  }
  process.stderr.write(`skyfold: warped ${frames} raw frames ${spec.width}x${spec.height} -> ${map.width}x${map.height} (${spec.format})\n`);
}
