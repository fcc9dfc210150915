/** Warp mesh files: one module per format, and a format-by-name front door for the CLI. */
import type { PixelSamples, TriangleWarpMesh, WarpMesh } from '@skyfold/warp-core';
import { checkMeshValues } from './check.js';
import { readCsv, writeCsv } from './csv.js';
import { readAnyGlb, readGlb, writeGlb, writeTriangleGlb, type GlbDome } from './glb.js';
import { checkTriangleValues } from './check.js';
import { readMpcdi, writeMpcdi, type MpcdiOptions } from './mpcdi.js';
import { readObj, readTriangleObj, writeObj, writeTriangleObj } from './obj.js';
import { readMeshPfm, writeMeshPfm } from './pfm.js';
import { readMapPng, writeMapPng, writePixelMapPng } from './png16.js';


export type MeshFormat = 'glb' | 'obj' | 'pfm' | 'mpcdi' | 'png' | 'csv';

export const MESH_FORMATS: readonly MeshFormat[] = ['glb', 'obj', 'pfm', 'mpcdi', 'png', 'csv'];

/** The format a file name's extension names (case-insensitive), or undefined. */
export function formatFromPath(path: string): MeshFormat | undefined {
  const ext = /\.([A-Za-z0-9]+)$/.exec(path)?.[1]?.toLowerCase();
  return ext !== undefined && (MESH_FORMATS as readonly string[]).includes(ext) ? (ext as MeshFormat) : undefined;
}

export interface EncodeMeshOptions {
  mpcdi?: MpcdiOptions;
  /** The exact values at every projector pixel centre: the MPCDI alpha map and the PNG map are then written per pixel. */
  pixels?: PixelSamples;
  /** An as-built dome's triangles, for the formats that carry them (.glb). */
  dome?: GlbDome;
  /** The adaptive mesh, written instead of the grid to the formats that can carry triangles (.glb, .obj). */
  adaptive?: TriangleWarpMesh;
}

/** The formats that can carry the adaptive mesh of triangles; the others are grids by definition. */
export const TRIANGLE_FORMATS: readonly MeshFormat[] = ['glb', 'obj'];

/** A .glb or .obj skyfold wrote: its grid, or its adaptive mesh of triangles. */
export async function decodeAnyMesh(bytes: Uint8Array, format: MeshFormat): Promise<{ grid: WarpMesh; triangles?: undefined } | { grid?: undefined; triangles: TriangleWarpMesh }> {
  if (format === 'glb') {
    const r = await readAnyGlb(bytes);
    return r.grid ? { grid: checkMeshValues(r.grid) } : { triangles: r.triangles };
  }
  if (format === 'obj') {
    const text = new TextDecoder().decode(bytes);
    const t = readTriangleObj(text);
    return t ? { triangles: checkTriangleValues(t) } : { grid: checkMeshValues(readObj(text)) };
  }
  return { grid: await decodeMesh(bytes, format) };
}

/** The mesh as the bytes of a file in the given format (text formats UTF-8). */
export async function encodeMesh(mesh: WarpMesh, format: MeshFormat, options: EncodeMeshOptions = {}): Promise<Uint8Array> {
  switch (format) {
    case 'glb':
      return options.adaptive ? writeTriangleGlb(options.adaptive, options.dome) : writeGlb(mesh, options.dome);
    case 'obj':
      return new TextEncoder().encode(options.adaptive ? writeTriangleObj(options.adaptive) : writeObj(mesh));
    case 'pfm':
      return writeMeshPfm(mesh);
    case 'mpcdi':
      return writeMpcdi(mesh, { ...options.mpcdi, pixels: options.pixels });
    case 'png':
      return options.pixels ? writePixelMapPng(options.pixels) : writeMapPng(mesh);
    case 'csv':
      return new TextEncoder().encode(writeCsv(mesh));
    default:
      throw new Error(`Expected a mesh format (${MESH_FORMATS.join(', ')}) but received ${String(format)}`);
  }
}

/**
 * Reads a mesh file. glb, obj and csv come back whole; pfm and png lack the projector resolution
 * (width/height = cols−1/rows−1) and meta; png is quantised to 1/65535; mpcdi gives u, v exactly but
 * brightness and mask only as sampled from its alpha map.
 */
export async function decodeMesh(bytes: Uint8Array, format: MeshFormat): Promise<WarpMesh> {
  return checkMeshValues(await decodeAny(bytes, format));
}

async function decodeAny(bytes: Uint8Array, format: MeshFormat): Promise<WarpMesh> {
  switch (format) {
    case 'glb':
      return readGlb(bytes);
    case 'obj':
      return readObj(new TextDecoder().decode(bytes));
    case 'pfm':
      return readMeshPfm(bytes);
    case 'mpcdi':
      return (await readMpcdi(bytes)).mesh;
    case 'png':
      return readMapPng(bytes);
    case 'csv':
      return readCsv(new TextDecoder().decode(bytes));
    default:
      throw new Error(`Expected a mesh format (${MESH_FORMATS.join(', ')}) but received ${String(format)}`);
  }
}
