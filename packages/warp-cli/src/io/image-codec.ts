/**
 * Images in and out, through sharp: the one place the CLI encodes raster buffers (frames, pictures,
 * patterns, mesh maps) to PNG, JPEG, TIFF or WebP, and decodes frames, with a cap on decoded size.
 */
import sharp, { type Metadata } from 'sharp';
import type { ImageBuffer } from '@skyfold/warp-core';

export type FrameFormat = 'png' | 'jpeg' | 'tiff' | 'webp';
export const FRAME_FORMATS: readonly FrameFormat[] = ['png', 'jpeg', 'tiff', 'webp'];
export const FRAME_EXTENSION: Readonly<Record<FrameFormat, string>> = { png: '.png', jpeg: '.jpg', tiff: '.tif', webp: '.webp' };

/** Default cap on decoded pixels: a 8192 × 8192 frame, twice the usual 4K dome master on each side. */
export const DEFAULT_MAX_PIXELS = 8192 * 8192;

/** A frame that cannot be used; `reason` is one line for the summary. */
export class FrameError extends Error {}

/** Interleaved samples, first row at the top; the last channel of 2 and 4 is alpha (straight, not premultiplied). */
export interface Raster {
  width: number;
  height: number;
  channels: 1 | 2 | 3 | 4;
  data: Uint8Array | Uint8ClampedArray | Uint16Array;
}

export interface EncodeOptions {
  format: FrameFormat;
  /** 1–100 for JPEG and WebP (default 92). */
  quality?: number;
  /** zlib level 0–9 for PNG (default 6: sharp's; 9 for files written once and kept, such as pictures and maps). */
  compression?: number;
}

function cleanSharpMessage(e: unknown): string {
  const msg = (e as Error)?.message ?? String(e);
  return msg.split('\n')[0].replace(/^Input (file|buffer) /, '').trim();
}

/**
 * Encodes a raster. 16-bit stays 16-bit for PNG and TIFF and is reduced to 8 for JPEG and WebP;
 * grey (with or without alpha) stays grey in a PNG.
 */
export async function encodeImage(img: Raster, o: EncodeOptions): Promise<Buffer> {
  let data = img.data;
  if (data instanceof Uint16Array && (o.format === 'jpeg' || o.format === 'webp')) {
    const d8 = new Uint8Array(data.length);
    for (let i = 0; i < data.length; i++) d8[i] = (data[i] + 128) / 257;
    data = d8;
  }
  const samples = data instanceof Uint8ClampedArray ? new Uint8Array(data.buffer, data.byteOffset, data.byteLength) : data;
  let s = sharp(samples, { raw: { width: img.width, height: img.height, channels: img.channels, premultiplied: false } });
  // sharp reads raw 8-bit grey as sRGB unless told; 16-bit needs its 16-bit colourspace either way
  if (samples instanceof Uint16Array) s = s.toColorspace(img.channels <= 2 ? 'grey16' : 'rgb16');
  else if (img.channels <= 2 && o.format === 'png') s = s.toColorspace('b-w');
  switch (o.format) {
    case 'png':
      s = s.png({ compressionLevel: o.compression ?? 6 });
      break;
    case 'jpeg':
      s = s.jpeg({ quality: o.quality ?? 92, chromaSubsampling: '4:4:4' });
      break;
    case 'tiff':
      s = s.tiff({ compression: 'lzw', predictor: 'horizontal' });
      break;
    case 'webp':
      s = s.webp({ quality: o.quality ?? 92 });
      break;
  }
  return s.toBuffer();
}

/** A PNG of a raster. */
export function encodePng(img: Raster, compression?: number): Promise<Buffer> {
  return encodeImage(img, { format: 'png', compression });
}

/** The size an image file's header gives, or undefined when it cannot be read. */
export async function readImageSize(input: string | Uint8Array): Promise<[number, number] | undefined> {
  try {
    const m = await sharp(input, { limitInputPixels: false }).metadata();
    return m.width && m.height ? [m.width, m.height] : undefined;
  } catch {
    return undefined;
  }
}

/** Decodes an image file into interleaved samples (Uint16Array when the file holds 16 bits per sample). */
export async function decodeImage(input: string | Uint8Array, maxPixels = DEFAULT_MAX_PIXELS): Promise<ImageBuffer> {
  let meta: Metadata;
  try {
    meta = await sharp(input, { limitInputPixels: false }).metadata();
  } catch (e) {
    throw new FrameError(`unreadable image: ${cleanSharpMessage(e)}`);
  }
  const w = meta.width ?? 0;
  const h = meta.height ?? 0;
  if (!(w > 0 && h > 0)) throw new FrameError('unreadable image: no size in its header');
  if (w * h > maxPixels) throw new FrameError(`image is ${w}x${h} (${w * h} pixels), over the limit of ${maxPixels} pixels (raise it with --max-pixels)`);
  const sixteen = meta.depth === 'ushort';
  const inChannels = meta.channels ?? 3;
  try {
    let img = sharp(input, { limitInputPixels: maxPixels, failOn: 'truncated' });
    if (sixteen) img = img.toColorspace(inChannels <= 2 ? 'grey16' : 'rgb16');
    const { data, info } = await img.raw(sixteen ? { depth: 'ushort' } : {}).toBuffer({ resolveWithObject: true });
    const channels = info.channels as 1 | 2 | 3 | 4;
    const samples = sixteen
      ? new Uint16Array(data.buffer.slice(data.byteOffset, data.byteOffset + data.byteLength))
      : new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
    return { width: info.width, height: info.height, channels, data: samples };
  } catch (e) {
    throw new FrameError(`unreadable image: ${cleanSharpMessage(e)}`);
  }
}

/** The frame format a file extension names, if any. */
export function formatOfPath(path: string): FrameFormat | undefined {
  const ext = path.toLowerCase().split('.').pop();
  if (ext === 'png') return 'png';
  if (ext === 'jpg' || ext === 'jpeg') return 'jpeg';
  if (ext === 'tif' || ext === 'tiff') return 'tiff';
  if (ext === 'webp') return 'webp';
  return undefined;
}
