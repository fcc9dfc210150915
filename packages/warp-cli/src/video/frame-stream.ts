/**
 * Fixed-size raw frames over pipes: read each frame straight into a buffer the caller owns (no
 * growing concatenation), and write with back-pressure without piling up listeners.
 */
import type { ImageBuffer } from '@skyfold/warp-core';

/**
 * A zeroed RGB frame, width × height at 1 or 2 bytes a sample: the bytes a pipe reads into or writes
 * from, and the image over those same bytes (16-bit samples read in place: little-endian hosts).
 */
export function rgbFrame(width: number, height: number, bytesPerSample: 1 | 2): { bytes: Buffer; image: ImageBuffer } {
  const n = width * height * 3 * bytesPerSample;
  const bytes = Buffer.alloc(n);
  const data = bytesPerSample === 2 ? new Uint16Array(bytes.buffer, bytes.byteOffset, n / 2) : new Uint8Array(bytes.buffer, bytes.byteOffset, n);
  return { bytes, image: { width, height, channels: 3, data } };
}

/** Reads exactly `frameBytes` at a time from a stream; `next(into)` fills `into` or returns false at a clean end. */
export class FrameReader {
  private readonly iter: AsyncIterator<Buffer>;
  private rest: Buffer | undefined;

  constructor(stream: NodeJS.ReadableStream, readonly frameBytes: number) {
    this.iter = (stream as AsyncIterable<Buffer>)[Symbol.asyncIterator]();
  }

  /** Fills `into` (at least frameBytes long) with the next frame; false when the stream ended exactly between frames. */
  async next(into: Uint8Array): Promise<boolean> {
    let have = 0;
    for (;;) {
      let chunk = this.rest;
      this.rest = undefined;
      if (!chunk) {
        const r = await this.iter.next();
        if (r.done) {
          if (have === 0) return false;
          throw new TruncatedFrame(have, this.frameBytes);
        }
        chunk = r.value;
      }
      const take = Math.min(chunk.length, this.frameBytes - have);
      into.set(chunk.subarray(0, take), have);
      have += take;
      if (take < chunk.length) this.rest = chunk.subarray(take);
      if (have === this.frameBytes) return true;
    }
  }
}

export class TruncatedFrame extends Error {
  constructor(
    readonly have: number,
    readonly want: number,
  ) {
    super(`the stream ended inside a frame (${have} of ${want} bytes)`);
  }
}

/**
 * Writes bytes, resolving when the stream can take more; rejects if the stream errors or closes
 * first. Each call removes the listeners it added, so a long run never trips the max-listeners warning.
 */
export function writeWithBackpressure(stream: NodeJS.WritableStream, bytes: Uint8Array): Promise<void> {
  return new Promise((resolve, reject) => {
    let ok: boolean;
    try {
      ok = stream.write(bytes);
    } catch (e) {
      reject(e as Error);
      return;
    }
    if (ok) {
      resolve();
      return;
    }
    const done = (e?: Error) => {
      stream.removeListener('drain', onDrain);
      stream.removeListener('error', onError);
      stream.removeListener('close', onClose);
      if (e) reject(e);
      else resolve();
    };
    const onDrain = () => done();
    const onError = (e: Error) => done(e);
    const onClose = () => done(Object.assign(new Error('the pipe closed'), { code: 'EPIPE' }));
    stream.on('drain', onDrain);
    stream.on('error', onError);
    stream.on('close', onClose);
  });
}

/** Writes bytes and resolves once the stream has handed all of them on, so the caller may refill the buffer. */
export function writeFlushed(stream: NodeJS.WritableStream, bytes: Uint8Array): Promise<void> {
  return new Promise((resolve, reject) => {
    stream.write(bytes, (e?: Error | null) => (e ? reject(e) : resolve()));
  });
}
