/** Runs a batch's jobs: on a pool of worker threads, or one after another on this thread. */
import type { RemapMap } from '@skyfold/warp-core';
import { runFrameJob, type FrameJob, type FrameOutcome, type WarpSettings } from './job.js';
import { FramePool } from './pool.js';
import type { StopSignal } from './stop-signal.js';
import { runContext } from '../io/run-context.js';

/**
 * Runs `jobs` on `threads` workers (this thread alone when 1), calling `finish` (which must not throw)
 * as each completes,
 * until all are done or `stop` fires: frames in flight on workers are then dropped (the workers end),
 * a frame on this thread is finished first.
 */
export async function runJobs<J extends FrameJob>(
  jobs: J[],
  map: RemapMap,
  settings: WarpSettings,
  threads: number,
  stop: StopSignal,
  finish: (job: J, outcome: FrameOutcome) => void,
): Promise<void> {
  if (threads <= 1) {
    const scratch = {};
    for (const job of jobs) {
      if (stop.stopping) break;
      finish(job, await runFrameJob(job, map, settings, scratch));
    }
    return;
  }
  const pool = new FramePool(map, settings, threads, runContext().frameWorker);
  try {
    let next = 0;
    const running = new Set<Promise<void>>();
    while ((next < jobs.length || running.size > 0) && !stop.stopping) {
      while (next < jobs.length && pool.free > 0 && !stop.stopping) {
        const job = jobs[next++];
        const p: Promise<void> = pool
          .run(job)
          .catch((e: unknown): FrameOutcome => ({ id: job.id, ok: false, reason: `failed: ${String((e as Error)?.message ?? e).split('\n')[0]}` }))
          .then((o) => {
            running.delete(p);
            if (!stop.stopping) finish(job, o);
          });
        running.add(p);
      }
      if (running.size > 0) await Promise.race([...running, stop.stopped]);
      else if (next < jobs.length && pool.free === 0) {
        // every worker died and none is left: the remaining frames fail, the run ends
        while (next < jobs.length) {
          const job = jobs[next++];
          finish(job, { id: job.id, ok: false, reason: 'not warped: the worker threads kept dying' });
        }
      }
    }
  } finally {
    await pool.close();
  }
}
