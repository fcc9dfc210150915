/**
 * 16-bit RGBA PNG map: one pixel per mesh vertex, the top row of the projector frame at the top of
 * the image (PNG rows run top to bottom), left to right.
 *
 *   R = u, G = v (fisheye, u right, v down), B = brightness, A = mask, each as round(x·65535).
 *
 * u and v are clamped to [0, 1] (a point can sit slightly outside the fisheye square; the map cannot
 * say so). Brightness and mask are linear-light factors, stored without any transfer function.
 * Unlit points keep their u, v and brightness with A = 0; the colour channels are not premultiplied.
 *
 * Written at full resolution (`--alpha-resolution full`), the map has one pixel per projector pixel
 * instead, each the exact trace at that pixel's centre (x + 0.5, y + 0.5), and says so in a PNG tEXt
 * chunk (PNG specification, ISO/IEC 15948, Sec. 11.3.4.3): keyword `skyfold-layout`, text
 * `pixel-centres`. Such a map is not a vertex grid and is not read back as a mesh.
 */
import { crc32 } from 'node:zlib';
import sharp from 'sharp';
import type { PixelSamples, WarpMesh } from '@skyfold/warp-core';
import { encodePng } from '../io/image-codec.js';
import { meshForGridImage, type GridImageOptions } from './check.js';

/** tEXt keyword and text that mark a full-resolution (per pixel centre) map. */
export const PNG_LAYOUT_KEYWORD = 'skyfold-layout';
export const PNG_LAYOUT_PIXELS = 'pixel-centres';

const MAX16 = 65535;

function to16(x: number): number {
  return Math.round(Math.min(1, Math.max(0, x)) * MAX16);
}

/** Decodes a PNG to 16-bit samples; throws unless it really is 16 bits per sample. */
export async function decodePng16(bytes: Uint8Array): Promise<{ width: number; height: number; channels: number; data: Uint16Array }> {
  const image = sharp(bytes);
  const meta = await image.metadata();
  if (meta.format !== 'png') throw new Error(`Expected a PNG but received ${meta.format ?? 'unknown data'}`);
  if (meta.depth !== 'ushort') throw new Error(`Expected a 16-bit PNG but received sample depth ${meta.depth}`);
  // Without an explicit 16-bit colourspace sharp would hand back 8-bit sRGB values widened to ushort.
  const space = meta.channels !== undefined && meta.channels <= 2 ? 'grey16' : 'rgb16';
  const { data, info } = await image.toColorspace(space).raw({ depth: 'ushort' }).toBuffer({ resolveWithObject: true });
  const samples = new Uint16Array(data.buffer.slice(data.byteOffset, data.byteOffset + data.byteLength));
  return { width: info.width, height: info.height, channels: info.channels, data: samples };
}

/** The full-resolution map: one pixel per projector pixel, the exact values at its centre, marked by a tEXt chunk. */
export async function writePixelMapPng(f: PixelSamples): Promise<Uint8Array> {
  const n = f.width * f.height;
  const data = new Uint16Array(n * 4);
  for (let i = 0; i < n; i++) {
    data[i * 4] = to16(f.u[i]);
    data[i * 4 + 1] = to16(f.v[i]);
    data[i * 4 + 2] = to16(f.brightness[i]);
    data[i * 4 + 3] = to16(f.mask[i]);
  }
  return withTextChunk(await encodePng({ width: f.width, height: f.height, channels: 4, data }, 9), PNG_LAYOUT_KEYWORD, PNG_LAYOUT_PIXELS);
}

/**
 * Inserts a tEXt chunk right after IHDR (PNG specification, ISO/IEC 15948, Sec. 5.3 chunk layout:
 * length, type, data, CRC-32 over type and data; Sec. 11.3.4.3 tEXt: keyword, a zero byte, Latin-1 text).
 */
export function withTextChunk(png: Uint8Array, keyword: string, text: string): Uint8Array {
  const ihdrEnd = 8 + 4 + 4 + 13 + 4; // signature, then IHDR: length, type, 13 data bytes, CRC
  const body = new TextEncoder().encode(`tEXt${keyword}\0${text}`);
  const chunk = new Uint8Array(4 + body.length + 4);
  const dv = new DataView(chunk.buffer);
  dv.setUint32(0, body.length - 4);
  chunk.set(body, 4);
  dv.setUint32(4 + body.length, crc32(body));
  const out = new Uint8Array(png.length + chunk.length);
  out.set(png.subarray(0, ihdrEnd));
  out.set(chunk, ihdrEnd);
  out.set(png.subarray(ihdrEnd), ihdrEnd + chunk.length);
  return out;
}

/** The text of the first tEXt chunk with this keyword, or undefined. */
export function readTextChunk(png: Uint8Array, keyword: string): string | undefined {
  const dv = new DataView(png.buffer, png.byteOffset, png.byteLength);
  for (let at = 8; at + 12 <= png.length; ) {
    const len = dv.getUint32(at);
    const type = String.fromCharCode(...png.subarray(at + 4, at + 8));
    if (type === 'IDAT' || type === 'IEND') return undefined; // tEXt chunks skyfold writes come before the image data
    if (type === 'tEXt' && at + 8 + len <= png.length) {
      const data = png.subarray(at + 8, at + 8 + len);
      const zero = data.indexOf(0);
      if (zero >= 0 && new TextDecoder('latin1').decode(data.subarray(0, zero)) === keyword) return new TextDecoder('latin1').decode(data.subarray(zero + 1));
    }
    at += 12 + len;
  }
  return undefined;
}

export async function writeMapPng(mesh: WarpMesh): Promise<Uint8Array> {
  const n = mesh.cols * mesh.rows;
  const data = new Uint16Array(n * 4);
  for (let i = 0; i < n; i++) {
    data[i * 4] = to16(mesh.u[i]);
    data[i * 4 + 1] = to16(mesh.v[i]);
    data[i * 4 + 2] = to16(mesh.brightness[i]);
    data[i * 4 + 3] = to16(mesh.mask[i]);
  }
  return encodePng({ width: mesh.cols, height: mesh.rows, channels: 4, data }, 9);
}

export type ReadMapPngOptions = GridImageOptions;

/** Reads a map written by {@link writeMapPng}; values come back quantised to 1/65535. */
export async function readMapPng(bytes: Uint8Array, options: ReadMapPngOptions = {}): Promise<WarpMesh> {
  if (readTextChunk(bytes, PNG_LAYOUT_KEYWORD) === PNG_LAYOUT_PIXELS) {
    throw new Error('Expected a vertex-grid PNG map but received a full-resolution one (one pixel per projector pixel, written with --alpha-resolution full)');
  }
  const img = await decodePng16(bytes);
  if (img.channels !== 4) throw new Error(`Expected a 4-channel (RGBA) PNG map but received ${img.channels} channels`);
  const mesh = meshForGridImage(img, 'a PNG map', options);
  const n = mesh.cols * mesh.rows;
  for (let i = 0; i < n; i++) {
    mesh.u[i] = img.data[i * 4] / MAX16;
    mesh.v[i] = img.data[i * 4 + 1] / MAX16;
    mesh.brightness[i] = img.data[i * 4 + 2] / MAX16;
    mesh.mask[i] = img.data[i * 4 + 3] / MAX16;
  }
  return mesh;
}
