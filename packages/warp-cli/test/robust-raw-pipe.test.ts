/**
 * Issue 10: a raw pipe whose reader leaves early (`| head -c 1000`) ends quietly, the way a Unix
 * filter treats EPIPE; any other write failure still surfaces.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough, Writable } from 'node:stream';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadMapSource } from '../src/warp/map-source.js';
import { runRawPipe } from '../src/warp/raw-pipe.js';

const DEMO = fileURLToPath(new URL('../../../fixtures/demo-rig.yaml', import.meta.url));
let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-rawpipe-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A writer that takes `accept` writes, then fails every later one with `code`. */
function failingWriter(accept: number, code: string): Writable & { taken: number } {
  const w = new Writable({
    write(_chunk, _enc, cb) {
      if (w.taken < accept) {
        w.taken++;
        cb();
      } else cb(Object.assign(new Error(`write ${code}`), { code }));
    },
  }) as Writable & { taken: number };
  w.taken = 0;
  return w;
}

async function pipeOf(frames: number, output: Writable): Promise<{ log: string; error?: unknown }> {
  const rig = join(dir, 'rig.yaml');
  writeFileSync(rig, readFileSync(DEMO, 'utf8').replace('resolution: [1920, 1200]', 'resolution: [64, 40]'));
  const map = await loadMapSource(rig);
  const input = new PassThrough();
  for (let i = 0; i < frames; i++) input.write(Buffer.alloc(32 * 32 * 3, i));
  input.end();
  let log = '';
  const logStream = new Writable({ write: (c, _e, cb) => ((log += String(c)), cb()) });
  try {
    await runRawPipe(map, {}, { width: 32, height: 32, format: 'rgb24' }, 'bilinear', { input, output, log: logStream });
    return { log };
  } catch (error) {
    return { log, error };
  }
}

describe('raw pipe: the reader goes away', () => {
  it('EPIPE after the first frame stops quietly, saying how many frames went out', async () => {
    const out = failingWriter(1, 'EPIPE');
    const r = await pipeOf(5, out);
    expect(r.error).toBeUndefined();
    expect(out.taken).toBe(1);
    expect(r.log).toMatch(/warped 1 raw frames .*the reader closed the pipe/);
  });

  it('a disk-full write error is not swallowed', async () => {
    const r = await pipeOf(3, failingWriter(1, 'ENOSPC'));
    expect((r.error as NodeJS.ErrnoException)?.code).toBe('ENOSPC');
  });

  it('all frames through when the reader stays', async () => {
    const out = failingWriter(100, 'EPIPE');
    const r = await pipeOf(4, out);
    expect(r.error).toBeUndefined();
    expect(out.taken).toBe(4);
    expect(r.log).toMatch(/warped 4 raw frames 32x32 -> 64x40/);
  });
});
