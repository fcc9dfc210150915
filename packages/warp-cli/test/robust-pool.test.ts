/**
 * Issue 10: a worker that dies (an uncaught exception, an exit) fails the frame it held and is
 * replaced; the other frames still run, and a pool whose workers keep dying stops taking work instead
 * of leaving the run waiting for ever.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { FramePool } from '../src/warp/pool.js';
import type { FrameJob, FrameOutcome, WarpSettings } from '../src/warp/job.js';

let dir: string;
let script: URL;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-pool-'));
  // a stand-in frame worker: "throw" and "exit" frames kill it the two ways a worker dies
  const file = join(dir, 'fragile-worker.mjs');
  writeFileSync(
    file,
    `import { parentPort } from 'node:worker_threads';
parentPort.on('message', (job) => {
  if (job.input.includes('throw')) throw new Error('out of memory (pretend)');
  if (job.input.includes('exit')) process.exit(7);
  setTimeout(() => parentPort.postMessage({ id: job.id, ok: true, ms: 0 }), 5);
});
`,
  );
  script = pathToFileURL(file);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const map = { width: 2, height: 2, x: new Float32Array(4), y: new Float32Array(4), gain: new Float32Array(4) };
const settings: WarpSettings = { filter: 'nearest', maxPixels: 100, sourceSize: [2, 2], encode: {} };
const job = (id: number, input: string): FrameJob => ({ id, input, output: `${input}.out`, temp: `${input}.tmp`, format: 'png' });

/** Runs the jobs the way `warp` does: as many at a time as there are free workers. */
async function runAll(pool: FramePool, jobs: FrameJob[]): Promise<FrameOutcome[]> {
  const results: FrameOutcome[] = [];
  let next = 0;
  const running = new Set<Promise<void>>();
  while (next < jobs.length || running.size > 0) {
    while (next < jobs.length && pool.free > 0) {
      const p: Promise<void> = pool.run(jobs[next++]).then((o) => {
        running.delete(p);
        results.push(o);
      });
      running.add(p);
    }
    if (running.size > 0) await Promise.race(running);
    else if (next < jobs.length) {
      for (; next < jobs.length; next++) results.push({ id: jobs[next].id, ok: false, reason: 'no worker' });
    }
  }
  return results.sort((a, b) => a.id - b.id);
}

describe('FramePool with dying workers', () => {
  it('a frame whose worker throws or exits fails; the worker is replaced and the other frames run', async () => {
    const pool = new FramePool(map, settings, 2, script);
    const jobs = ['a', 'throw-b', 'c', 'exit-d', 'e', 'f'].map((n, i) => job(i, n));
    const out = await runAll(pool, jobs);
    await pool.close();
    expect(out.map((o) => o.ok)).toEqual([true, false, true, false, true, true]);
    expect(out[1].ok === false && out[1].reason).toMatch(/the worker warping this frame failed: out of memory \(pretend\)/);
    expect(out[3].ok === false && out[3].reason).toMatch(/exited \(exit code 7\)/);
  });

  it('workers that keep dying: the pool stops starting new ones and the run still ends', async () => {
    const pool = new FramePool(map, settings, 2, script);
    const jobs = Array.from({ length: 20 }, (_, i) => job(i, `exit-${i}`));
    const out = await runAll(pool, jobs);
    await pool.close();
    expect(out).toHaveLength(20);
    expect(out.every((o) => !o.ok)).toBe(true);
    expect(pool.dead).toBe(true);
  });
});
