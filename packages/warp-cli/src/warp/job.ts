/** One frame's work, shared by the worker threads and the in-process path. */
import { createImageLike, fixedBilinearApplies, prepareArea, prepareBilinear, remap, type ImageBuffer, type PreparedArea, type PreparedBilinear, type RemapFilter, type RemapMap } from '@skyfold/warp-core';
import { decodeImage, encodeImage, FrameError, type EncodeOptions } from '../io/image-codec.js';
import { writeFileAtomic } from '../io/output-file.js';
import { alphaUnused, fillAlpha } from './opaque.js';

export interface WarpSettings {
  filter: RemapFilter;
  maxPixels: number;
  /** Expected source size; a frame of another size is refused. */
  sourceSize: [number, number];
  /** Per-frame output format, or undefined to keep each input's own. */
  encode: Omit<EncodeOptions, 'format'> & { format?: EncodeOptions['format'] };
}

export interface FrameJob {
  id: number;
  input: string;
  output: string;
  temp: string;
  format: EncodeOptions['format'];
}

export type FrameOutcome = { id: number; ok: true; ms: number } | { id: number; ok: false; reason: string };

/** Decodes, checks, warps, encodes and writes one frame (temporary file, then rename). */
export async function runFrameJob(job: FrameJob, map: RemapMap, s: WarpSettings, scratch: { out?: ImageBuffer; prepared?: PreparedBilinear; areaPlan?: PreparedArea }): Promise<FrameOutcome> {
  const t0 = performance.now();
  try {
    const src = await decodeImage(job.input, s.maxPixels);
    if (src.width !== s.sourceSize[0] || src.height !== s.sourceSize[1]) {
      throw new FrameError(`wrong size: ${src.width}x${src.height}, expected ${s.sourceSize[0]}x${s.sourceSize[1]} like the first frame`);
    }
    let out = scratch.out;
    if (!out || out.channels !== src.channels || out.data.BYTES_PER_ELEMENT !== src.data.BYTES_PER_ELEMENT) {
      out = scratch.out = createImageLike(src, map.width, map.height);
    }
    remap(src, map, { filter: s.filter, out, prepared: preparedFor(src, map, s.filter, scratch), areaPlan: areaPlanFor(src, map, s.filter, scratch) });
    if (alphaUnused(src)) fillAlpha(out);
    writeFileAtomic(job.output, await encodeImage(out, { ...s.encode, format: job.format }), job.temp);
    return { id: job.id, ok: true, ms: performance.now() - t0 };
  } catch (e) {
    const reason = e instanceof FrameError ? e.message : `failed: ${(e as Error)?.message?.split('\n')[0] ?? String(e)}`;
    return { id: job.id, ok: false, reason };
  }
}

/**
 * The 'area' filter's footprints of `map` for sources like `src`, worked out once and kept in
 * `scratch` (the same pixels as without them); undefined for other filters and channel counts.
 */
export function areaPlanFor(src: ImageBuffer, map: RemapMap, filter: RemapFilter, scratch: { areaPlan?: PreparedArea }): PreparedArea | undefined {
  if (filter !== 'area' || (src.channels !== 3 && src.channels !== 4)) return undefined;
  const p = scratch.areaPlan;
  if (p && p.map === map && p.srcWidth === src.width && p.srcHeight === src.height) return p;
  return (scratch.areaPlan = prepareArea(map, src.width, src.height));
}

/**
 * The map prepared once for fixed-point bilinear sampling (warp-core bilinear-fixed.ts) of sources
 * like `src`, kept in `scratch`; undefined for other filters and sources the float kernel serves.
 */
export function preparedFor(src: ImageBuffer, map: RemapMap, filter: RemapFilter, scratch: { prepared?: PreparedBilinear }): PreparedBilinear | undefined {
  if (filter !== 'bilinear' || !fixedBilinearApplies(src)) return undefined;
  const p = scratch.prepared;
  if (p && p.map === map && p.srcWidth === src.width && p.srcHeight === src.height && p.channels === src.channels) return p;
  return (scratch.prepared = prepareBilinear(map, src.width, src.height, src.channels as 3 | 4));
}
