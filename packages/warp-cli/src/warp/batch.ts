/**
 * A batch of frames (files, folders, sequences) warped into an output folder: resumable through the
 * run log, in parallel, stopped cleanly by Ctrl-C. Each step is a function of its own in warp/.
 */
import { availableParallelism } from 'node:os';
import { basename } from 'node:path';
import type { RemapFilter } from '@skyfold/warp-core';
import { runContext, setExitCode, writeErr } from '../io/run-context.js';
import type { FrameFormat } from '../io/image-codec.js';
import { expandInputs, selectFrames } from './inputs.js';
import type { FrameOutcome, WarpSettings } from './job.js';
import { Manifest } from './manifest.js';
import type { MapSettings, MapSource } from './map-source.js';
import { hostTag, partialTag, prepareOutputFolder, removeOwnPartials, removeStalePartials } from './output-folder.js';
import { pendingJobs, settingsKey, type BatchJob } from './pending.js';
import { Progress } from './progress.js';
import { runJobs } from './schedule.js';
import { voteSourceSize } from './size-vote.js';
import { stopOnSignals } from './stop-signal.js';
import { printSummary } from './summary.js';

export interface BatchOptions {
  output: string;
  format?: FrameFormat;
  quality?: number;
  /** PNG zlib level 0–9 (default 6). */
  compression?: number;
  filter: RemapFilter;
  frames?: [number, number];
  shard?: [number, number];
  jobs?: number;
  overwrite?: boolean;
  maxPixels: number;
  json?: boolean;
}

/** Warps the frames `inputs` name into `opts.output`; exit code 1 when a frame failed, 130 when stopped. */
export async function warpFrames(map: MapSource, mapSettings: MapSettings, inputs: string[], opts: BatchOptions): Promise<void> {
  const t0 = performance.now();
  const all = expandInputs(inputs);
  const frames = selectFrames(all, opts.frames, opts.shard);
  const outDir = prepareOutputFolder(opts.output, all);
  const host = hostTag();
  removeStalePartials(outDir, host);

  const key = settingsKey(map.key, mapSettings, opts);
  const manifest = new Manifest(outDir);
  const tag = partialTag(host);
  const { jobs, skipped } = pendingJobs(frames, outDir, manifest, key, { format: opts.format, overwrite: opts.overwrite, tag });

  const failures: { input: string; reason: string }[] = [];
  let done = 0;
  if (jobs.length > 0) {
    const size = await voteSourceSize(jobs.map((j) => j.input));
    const progress = new Progress(jobs.length, runContext().stderr, !opts.json);
    // never throws: a failure while finishing a frame (the run log on a full disk, an input gone) fails that frame
    const finish = (job: BatchJob, o: FrameOutcome) => {
      let outcome = o;
      if (o.ok) {
        try {
          manifest.record(basename(job.output), job.input, key);
        } catch (e) {
          const why = String((e as Error)?.message ?? e).split('\n')[0];
          outcome = { id: job.id, ok: false, reason: `warped, but the run log could not record it: ${why.length > 160 ? why.slice(0, 159) + '…' : why}` };
        }
      }
      if (outcome.ok) done++;
      else failures.push({ input: job.frame.path, reason: outcome.reason });
      try {
        progress.tick(job.frame.name, outcome.ok, outcome.ok ? '' : outcome.reason);
      } catch {
        // progress is a courtesy; the summary still comes
      }
    };
    if (!size) {
      for (const j of jobs) finish(j, { id: j.id, ok: false, reason: 'unreadable image: no size in its header' });
    } else {
      const settings: WarpSettings = { filter: opts.filter, maxPixels: opts.maxPixels, sourceSize: size, encode: { quality: opts.quality, compression: opts.compression } };
      const threads = Math.max(1, Math.min(opts.jobs ?? availableParallelism(), jobs.length));
      const stop = stopOnSignals();
      try {
        await runJobs(jobs, map.build(size, mapSettings), settings, threads, stop, finish);
      } finally {
        stop.dispose();
        removeOwnPartials(outDir, tag);
      }
      if (stop.stopping) {
        progress.finish();
        writeErr(`skyfold: stopped; ${done} frames finished this run. Run the same command again to finish the rest.\n`);
        setExitCode(130);
        return;
      }
    }
    progress.finish();
  }
  const seconds = (performance.now() - t0) / 1000;
  printSummary({ done, skipped, failed: failures.length, failures, total: frames.length, output: opts.output, seconds }, opts.json);
  if (failures.length > 0) setExitCode(1);
}
