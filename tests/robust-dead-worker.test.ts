/**
 * Issue 10: a warp worker that dies (an uncaught exception such as running out of memory, an exit)
 * through the CLI: its frame is reported failed, a new worker takes its place, the other frames are
 * warped, and the run ends with the usual summary and exit 1 (DESIGN.md: the work ran, some failed).
 * A frame deleted mid-run (the input gone when its run-log line is written) fails that frame alone.
 * The real frame worker runs, wrapped by one that dies on (or deletes) frames named for it; the wrapper reaches the
 * program through the run's `frameWorker`, which no option or environment variable can set.
 */
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable, Writable } from 'node:stream';
import { fileURLToPath, pathToFileURL } from 'node:url';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { run } from '@skyfold/warp-cli';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const REAL_WORKER = pathToFileURL(join(ROOT, 'packages', 'warp-cli', 'dist', 'warp', 'worker.js'));
let dir: string;
let rig: string;
let fragile: URL;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-dead-worker-'));
  rig = join(dir, 'rig.yaml');
  writeFileSync(rig, readFileSync(join(ROOT, 'fixtures', 'demo-rig.yaml'), 'utf8').replace('resolution: [1920, 1200]', 'resolution: [96, 60]'));
  const file = join(dir, 'fragile-worker.mjs');
  // the real worker, its message listener wrapped so that a doomed frame never reaches it
  writeFileSync(
    file,
    `import { unlinkSync } from 'node:fs';
import { parentPort } from 'node:worker_threads';
const on = parentPort.on.bind(parentPort);
// a frame named "gone" is deleted once warped, before its outcome goes back: an input removed mid-run
const inputs = new Map();
const post = parentPort.postMessage.bind(parentPort);
parentPort.postMessage = (outcome) => {
  const input = inputs.get(outcome.id);
  if (input && input.includes('gone')) unlinkSync(input);
  post(outcome);
};
parentPort.on = (event, listener) => on(event, event !== 'message' ? listener : (job) => {
  if (job.input.includes('crash')) throw new Error('JS heap out of memory (pretend)');
  if (job.input.includes('vanish')) process.exit(9);
  inputs.set(job.id, job.input);
  listener(job);
});
await import(${JSON.stringify(REAL_WORKER.href)});
`,
  );
  fragile = pathToFileURL(file);
  const show = join(dir, 'show');
  mkdirSync(show);
  for (const [i, n] of ['a.png', 'b-crash.png', 'c.png', 'd-vanish.png', 'e.png', 'f.png'].entries()) {
    await sharp(Buffer.alloc(64 * 64 * 3, 30 + 30 * i), { raw: { width: 64, height: 64, channels: 3 } }).png().toFile(join(show, n));
  }
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function warp(out: string, extra: string[], show = join(dir, 'show')): Promise<{ code: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const code = await run(['warp', rig, show, '-o', out, '--jobs', '2', ...extra], {
    stdin: Readable.from([]),
    stdout: new Writable({ write: (c: Buffer, _e, done) => ((stdout += c.toString()), done()) }),
    stderr: new Writable({ write: (c: Buffer, _e, done) => ((stderr += c.toString()), done()) }),
    cwd: dir,
    env: { ...process.env, CI: 'true', SKYFOLD_DEBUG: '' },
    frameWorker: fragile,
  });
  return { code, stdout, stderr };
}

describe('a warp worker that dies, through the CLI', () => {
  it('--json: the two frames whose worker died fail, the other four are warped, exit 1', async () => {
    const out = join(dir, 'out-json');
    const r = await warp(out, ['--json']);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stderr).not.toMatch(/internal error/);
    const summary = JSON.parse(r.stdout);
    expect(summary).toMatchObject({ total: 6, done: 4, failed: 2 });
    const reasons = Object.fromEntries(summary.failures.map((f: { input: string; reason: string }) => [f.input.replace(/.*[\\/]/, ''), f.reason]));
    expect(Object.keys(reasons).sort()).toEqual(['b-crash.png', 'd-vanish.png']);
    expect(reasons['b-crash.png']).toMatch(/the worker warping this frame failed: JS heap out of memory \(pretend\)/);
    expect(reasons['d-vanish.png']).toMatch(/the worker warping this frame exited \(exit code 9\)/);
    // four frames warped means the dead workers were replaced: two workers, two deaths
    const written = readdirSync(out).filter((n) => n.endsWith('.png')).sort();
    expect(written).toEqual(['a.png', 'c.png', 'e.png', 'f.png']);
    expect(readdirSync(out).filter((n) => n.includes('partial'))).toEqual([]);
  });

  it('text: the usual summary line and one line per failed frame; the next run warps only those two', async () => {
    const out = join(dir, 'out-text');
    const r = await warp(out, []);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stderr).toMatch(/^4 warped, 0 already done, 2 failed of 6 frames in \d+\.\d s -> /m);
    expect(r.stderr).toMatch(/^ {2}failed: .*b-crash\.png: the worker warping this frame failed/m);
    expect(r.stderr).toMatch(/^ {2}failed: .*d-vanish\.png: the worker warping this frame exited/m);
    expect(existsSync(join(out, 'b-crash.png'))).toBe(false);
    const again = await warp(out, ['--json']);
    expect(JSON.parse(again.stdout)).toMatchObject({ total: 6, skipped: 4, failed: 2 });
  });

  it('a frame deleted while the run goes on (--jobs 2) fails, named, and the run ends with its summary', async () => {
    const show = join(dir, 'show-mid');
    mkdirSync(show);
    for (const [i, n] of ['p.png', 'q-gone.png', 'r.png'].entries()) {
      await sharp(Buffer.alloc(64 * 64 * 3, 60 + 40 * i), { raw: { width: 64, height: 64, channels: 3 } }).png().toFile(join(show, n));
    }
    const out = join(dir, 'out-mid');
    const r = await warp(out, ['--json'], show);
    expect(r.code, r.stderr).toBe(1);
    expect(r.stderr).not.toMatch(/internal error/);
    const summary = JSON.parse(r.stdout);
    expect(summary, JSON.stringify(summary.failures)).toMatchObject({ total: 3, done: 2, failed: 1 });
    expect(summary.failures[0].input).toMatch(/q-gone\.png$/);
    expect(summary.failures[0].reason).toMatch(/run log could not record it: .*ENOENT/);
    expect(readdirSync(out).filter((n) => n.includes('partial'))).toEqual([]);
  });
});
