/**
 * PFM (Portable Float Map): a text header and raw IEEE 754 float32 samples.
 *
 *   "PF\n" (3 channels) or "Pf\n" (1 channel), "W H\n", scale "-1.0\n", then W·H·channels floats.
 *
 * A negative scale means little-endian samples (netpbm's definition, https://netpbm.sourceforge.net/doc/pfm.html).
 * Row order is the catch: netpbm stores the rows bottom to top ('bottom-up'); the VESA MPCDI text stores
 * the first row at the top ('top-down'). Callers say which; in memory data is always top row first.
 */
import type { WarpMesh } from '@skyfold/warp-core';
import { meshForGridImage, type GridImageOptions } from './check.js';

export type PfmRowOrder = 'bottom-up' | 'top-down';

export interface PfmImage {
  width: number;
  height: number;
  channels: 1 | 3;
  /** Samples, interleaved per pixel, the top row first. */
  data: Float32Array;
}

export interface PfmOptions {
  /** 'bottom-up' = netpbm's definition; 'top-down' = the MPCDI warp file. */
  rowOrder: PfmRowOrder;
}

/** Encodes a float image as little-endian PFM. */
export function encodePfm(image: PfmImage, options: PfmOptions): Uint8Array {
  const { width, height, channels, data } = image;
  if (!Number.isInteger(width) || width < 1 || !Number.isInteger(height) || height < 1) {
    throw new Error(`Expected positive integer PFM size but received ${width}×${height}`);
  }
  if (channels !== 1 && channels !== 3) throw new Error(`Expected 1 or 3 PFM channels but received ${channels}`);
  const rowFloats = width * channels;
  if (data.length !== rowFloats * height) {
    throw new Error(`Expected ${rowFloats * height} PFM samples for ${width}×${height}×${channels} but received ${data.length}`);
  }
  const header = new TextEncoder().encode(`${channels === 3 ? 'PF' : 'Pf'}\n${width} ${height}\n-1.0\n`);
  const out = new Uint8Array(header.length + data.length * 4);
  out.set(header, 0);
  const view = new DataView(out.buffer, header.length);
  for (let fileRow = 0; fileRow < height; fileRow++) {
    const row = options.rowOrder === 'bottom-up' ? height - 1 - fileRow : fileRow;
    for (let i = 0; i < rowFloats; i++) view.setFloat32((fileRow * rowFloats + i) * 4, data[row * rowFloats + i], true);
  }
  return out;
}

/** Decodes a PFM (either endianness) into top-row-first samples. */
export function decodePfm(bytes: Uint8Array, options: PfmOptions): PfmImage {
  // Header: three whitespace-separated tokens after the magic, then exactly one whitespace byte.
  let p = 0;
  const token = (): string => {
    while (p < bytes.length && isSpace(bytes[p])) p++;
    const start = p;
    while (p < bytes.length && !isSpace(bytes[p]) && p - start < 32) p++;
    if (p >= bytes.length) throw new Error('Expected a PFM header but the data ended');
    if (!isSpace(bytes[p])) throw new Error('Expected a PFM header of short tokens but found a long run of bytes');
    let s = '';
    for (let i = start; i < p; i++) s += String.fromCharCode(bytes[i]);
    return s;
  };
  const magic = token();
  if (magic !== 'PF' && magic !== 'Pf') throw new Error(`Expected PFM magic "PF" or "Pf" but received "${magic.slice(0, 8)}"`);
  const channels = magic === 'PF' ? 3 : 1;
  const width = Number(token());
  const height = Number(token());
  const scale = Number(token());
  p++; // the single whitespace byte that ends the header
  if (!Number.isInteger(width) || width < 1 || !Number.isInteger(height) || height < 1) {
    throw new Error(`Expected positive integer PFM size but received ${width}×${height}`);
  }
  if (!Number.isFinite(scale) || scale === 0) throw new Error(`Expected a non-zero PFM scale but received ${scale}`);
  const littleEndian = scale < 0;
  const rowFloats = width * channels;
  const need = rowFloats * height * 4;
  if (bytes.length - p < need) throw new Error(`Expected ${need} bytes of PFM samples but received ${bytes.length - p}`);
  const view = new DataView(bytes.buffer, bytes.byteOffset + p, need);
  const data = new Float32Array(rowFloats * height);
  for (let fileRow = 0; fileRow < height; fileRow++) {
    const row = options.rowOrder === 'bottom-up' ? height - 1 - fileRow : fileRow;
    for (let i = 0; i < rowFloats; i++) data[row * rowFloats + i] = view.getFloat32((fileRow * rowFloats + i) * 4, littleEndian);
  }
  return { width, height, channels, data };
}

function isSpace(b: number): boolean {
  return b === 0x20 || b === 0x0a || b === 0x0d || b === 0x09;
}

/**
 * The mesh as a 3-channel PFM grid, one pixel per vertex, rows in netpbm's order (bottom to top):
 * channel 1 = u, 2 = v (fisheye, v down), 3 = brightness·mask. Unlit points keep their (finite) u, v
 * and hold 0 in channel 3. The projector resolution is not stored.
 */
export function writeMeshPfm(mesh: WarpMesh): Uint8Array {
  const n = mesh.cols * mesh.rows;
  const data = new Float32Array(n * 3);
  for (let i = 0; i < n; i++) {
    data[i * 3] = mesh.u[i];
    data[i * 3 + 1] = mesh.v[i];
    data[i * 3 + 2] = mesh.brightness[i] * mesh.mask[i];
  }
  return encodePfm({ width: mesh.cols, height: mesh.rows, channels: 3, data }, { rowOrder: 'bottom-up' });
}

export type ReadMeshPfmOptions = GridImageOptions;

/**
 * Reads a grid written by {@link writeMeshPfm}. The file holds brightness·mask only, so
 * brightness = channel 3 and mask = 1 where channel 3 > 0, else 0.
 */
export function readMeshPfm(bytes: Uint8Array, options: ReadMeshPfmOptions = {}): WarpMesh {
  const img = decodePfm(bytes, { rowOrder: 'bottom-up' });
  if (img.channels !== 3) throw new Error('Expected a 3-channel PFM ("PF") warp mesh but received a 1-channel one');
  const mesh = meshForGridImage(img, 'a PFM grid', options);
  const n = mesh.cols * mesh.rows;
  for (let i = 0; i < n; i++) {
    mesh.u[i] = img.data[i * 3];
    mesh.v[i] = img.data[i * 3 + 1];
    const b = img.data[i * 3 + 2];
    mesh.brightness[i] = b;
    mesh.mask[i] = b > 0 ? 1 : 0;
  }
  return mesh;
}
