/** A small pool of worker threads that warp frames; results come back in completion order. */
import { Worker } from 'node:worker_threads';
import type { RemapMap } from '@skyfold/warp-core';
import type { FrameJob, FrameOutcome, WarpSettings } from './job.js';

function shared(a: Float32Array): SharedArrayBuffer {
  const sab = new SharedArrayBuffer(a.byteLength);
  new Float32Array(sab).set(a);
  return sab;
}

export class FramePool {
  private workers: Worker[] = [];
  private idle: Worker[] = [];
  private waiting = new Map<Worker, (o: FrameOutcome) => void>();
  private closed = false;

  constructor(map: RemapMap, settings: WarpSettings, size: number) {
    const data = { map: { width: map.width, height: map.height, x: shared(map.x), y: shared(map.y), gain: shared(map.gain) }, settings };
    for (let i = 0; i < size; i++) {
      const w = new Worker(new URL('./worker.js', import.meta.url), { workerData: data });
      w.on('message', (o: FrameOutcome) => {
        const done = this.waiting.get(w);
        this.waiting.delete(w);
        this.idle.push(w);
        done?.(o);
      });
      w.on('error', (e) => {
        const done = this.waiting.get(w);
        this.waiting.delete(w);
        done?.({ id: -1, ok: false, reason: `worker failed: ${e.message}` });
      });
      this.workers.push(w);
      this.idle.push(w);
    }
  }

  get free(): number {
    return this.idle.length;
  }

  /** Runs one job on an idle worker (call only when `free` > 0). */
  run(job: FrameJob): Promise<FrameOutcome> {
    const w = this.idle.pop();
    if (!w || this.closed) return Promise.resolve({ id: job.id, ok: false, reason: 'stopped' });
    return new Promise((resolve) => {
      this.waiting.set(w, (o) => resolve(o.id === -1 ? { ...o, id: job.id } : o));
      w.postMessage(job);
    });
  }

  async close(): Promise<void> {
    this.closed = true;
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}
