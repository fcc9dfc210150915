/** Which frames of a batch still need warping: the run log's settings key and the jobs it leaves to do. */
import { createHash } from 'node:crypto';
import { join, resolve } from 'node:path';
import type { RemapFilter } from '@skyfold/warp-core';
import { FRAME_EXTENSION, formatOfPath, type FrameFormat } from '../io/image-codec.js';
import { VERSION } from '../version.js';
import type { Frame } from './inputs.js';
import type { FrameJob } from './job.js';
import type { Manifest } from './manifest.js';
import type { MapSettings } from './map-source.js';

export interface BatchJob extends FrameJob {
  frame: Frame;
}

export interface OutputSettings {
  filter: RemapFilter;
  format?: FrameFormat;
  quality?: number;
  compression?: number;
}

// PNG's level changes the bytes written; left out when not given, so run logs from before the option still match
const compressionKey = (out: OutputSettings) => (out.compression === undefined ? {} : { compression: out.compression });

/** Everything that changes an output frame, hashed: a frame done under another key is done again. */
export function settingsKey(mapKey: string, mapSettings: MapSettings, out: OutputSettings): string {
  return createHash('sha256')
    .update(JSON.stringify({ v: VERSION, map: mapKey, filter: out.filter, ...mapSettings, format: out.format ?? null, quality: out.quality ?? null, ...compressionKey(out) }))
    .digest('hex')
    .slice(0, 32);
}

/**
 * The jobs for the frames the run log does not list as done under `key` (all of them with
 * `overwrite`), each writing through a temporary file named with `tag`; `skipped` counts the rest.
 */
export function pendingJobs(
  frames: Frame[],
  outDir: string,
  manifest: Manifest,
  key: string,
  opts: { format?: FrameFormat; overwrite?: boolean; tag: string },
): { jobs: BatchJob[]; skipped: number } {
  const jobs: BatchJob[] = [];
  let skipped = 0;
  for (const frame of frames) {
    const format = opts.format ?? formatOfPath(frame.path) ?? 'png';
    const outName = frame.name + FRAME_EXTENSION[format];
    const input = resolve(frame.path);
    if (!opts.overwrite && manifest.isDone(outName, input, key)) {
      skipped++;
      continue;
    }
    jobs.push({ id: jobs.length, input, output: join(outDir, outName), temp: join(outDir, `.${outName}${opts.tag}${jobs.length}`), format, frame });
  }
  return { jobs, skipped };
}
