/**
 * A small pool of worker threads that warp frames; results come back in completion order. A worker
 * that dies (an exception it did not catch, running out of memory, an exit) fails the frame it held
 * and is replaced, so the run goes on; if replacements keep dying the pool stops taking work.
 */
import { Worker } from 'node:worker_threads';
import type { RemapMap } from '@skyfold/warp-core';
import type { FrameJob, FrameOutcome, WarpSettings } from './job.js';

function shared(a: Float32Array): SharedArrayBuffer {
  const sab = new SharedArrayBuffer(a.byteLength);
  new Float32Array(sab).set(a);
  return sab;
}

/** Deaths after which no more workers are started: a worker that cannot live would otherwise loop. */
const MAX_REPLACEMENTS = 8;

export class FramePool {
  private idle: Worker[] = [];
  private live = new Set<Worker>();
  private waiting = new Map<Worker, { id: number; done: (o: FrameOutcome) => void }>();
  private closed = false;
  private deaths = 0;
  private readonly data: unknown;

  /** `script` is the worker module (the frame worker; tests pass one that fails on purpose). */
  constructor(map: RemapMap, settings: WarpSettings, size: number, private readonly script: URL = new URL('./worker.js', import.meta.url)) {
    this.data = { map: { width: map.width, height: map.height, x: shared(map.x), y: shared(map.y), gain: shared(map.gain) }, settings };
    for (let i = 0; i < size; i++) this.start();
  }

  private start(): void {
    const w = new Worker(this.script, { workerData: this.data });
    this.live.add(w);
    this.idle.push(w);
    w.on('message', (o: FrameOutcome) => {
      const job = this.waiting.get(w);
      this.waiting.delete(w);
      if (!this.closed) this.idle.push(w);
      job?.done(o);
    });
    let reason = 'exited';
    w.on('error', (e) => {
      reason = `failed: ${String(e?.message ?? e).split('\n')[0]}`;
    });
    w.on('exit', (code) => this.died(w, code === 0 ? reason : `${reason} (exit code ${code})`));
  }

  /** A worker is gone: its frame fails, a replacement takes its place. */
  private died(w: Worker, reason: string): void {
    this.live.delete(w);
    this.idle = this.idle.filter((x) => x !== w);
    const job = this.waiting.get(w);
    this.waiting.delete(w);
    if (this.closed) {
      job?.done({ id: job.id, ok: false, reason: 'stopped' });
      return;
    }
    this.deaths++;
    if (this.deaths <= MAX_REPLACEMENTS) this.start();
    job?.done({ id: job.id, ok: false, reason: `the worker warping this frame ${reason}` });
  }

  /** Idle workers; 0 with nothing running means the pool can take no more work (see `dead`). */
  get free(): number {
    return this.closed ? 0 : this.idle.length;
  }

  /** True when every worker has died and none will be started again. */
  get dead(): boolean {
    return this.live.size === 0;
  }

  /** Runs one job on an idle worker (call only when `free` > 0). */
  run(job: FrameJob): Promise<FrameOutcome> {
    const w = this.idle.pop();
    if (!w || this.closed) return Promise.resolve({ id: job.id, ok: false, reason: this.closed ? 'stopped' : 'no worker left to warp it' });
    return new Promise((resolve) => {
      this.waiting.set(w, { id: job.id, done: resolve });
      try {
        w.postMessage(job);
      } catch (e) {
        this.waiting.delete(w);
        resolve({ id: job.id, ok: false, reason: `could not hand the frame to a worker: ${(e as Error).message}` });
      }
    });
  }

  async close(): Promise<void> {
    this.closed = true;
    await Promise.all([...this.live].map((w) => w.terminate()));
  }
}
