/**
 * 16-bit RGBA PNG map: one pixel per mesh vertex, the top row of the projector frame at the top of
 * the image (PNG rows run top to bottom), left to right.
 *
 *   R = u, G = v (fisheye, u right, v down), B = brightness, A = mask, each as round(x·65535).
 *
 * u and v are clamped to [0, 1] (a point can sit slightly outside the fisheye square; the map cannot
 * say so). Brightness and mask are linear-light factors, stored without any transfer function.
 * Unlit points keep their u, v and brightness with A = 0; the colour channels are not premultiplied.
 */
import sharp from 'sharp';
import { createMesh, type WarpMesh } from '@skyfold/warp-core';
import { encodePng } from '../io/image-codec.js';

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

export interface ReadMapPngOptions {
  /** Projector resolution the grid spans; defaults to cols−1 × rows−1 (one unit per grid step). */
  width?: number;
  height?: number;
  meta?: Record<string, unknown>;
}

/** Reads a map written by {@link writeMapPng}; values come back quantised to 1/65535. */
export async function readMapPng(bytes: Uint8Array, options: ReadMapPngOptions = {}): Promise<WarpMesh> {
  const img = await decodePng16(bytes);
  if (img.channels !== 4) throw new Error(`Expected a 4-channel (RGBA) PNG map but received ${img.channels} channels`);
  if (img.width < 2 || img.height < 2) throw new Error(`Expected a PNG map of at least 2×2 but received ${img.width}×${img.height}`);
  const cols = img.width;
  const rows = img.height;
  const n = cols * rows;
  const mesh = createMesh(cols, rows, options.width ?? cols - 1, options.height ?? rows - 1, options.meta ?? {});
  for (let i = 0; i < n; i++) {
    mesh.u[i] = img.data[i * 4] / MAX16;
    mesh.v[i] = img.data[i * 4 + 1] / MAX16;
    mesh.brightness[i] = img.data[i * 4 + 2] / MAX16;
    mesh.mask[i] = img.data[i * 4 + 3] / MAX16;
  }
  return mesh;
}
