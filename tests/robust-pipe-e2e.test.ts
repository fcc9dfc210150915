/**
 * Issue 10, end to end: `skyfold warp --raw-in` with a downstream reader that closes after 1000 bytes
 * (as `| head -c 1000` does) exits 0 with no internal error. Spawns the real binary: the broken pipe
 * is the operating system's.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, expect, it } from 'vitest';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const BIN = join(ROOT, 'packages', 'warp-cli', 'bin', 'skyfold.js');
let dir: string;
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-epipe-'));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

it('a reader that leaves early ends the pipe quietly (EPIPE is a normal stop)', async () => {
  const rig = join(dir, 'rig.yaml');
  writeFileSync(rig, readFileSync(join(ROOT, 'fixtures', 'demo-rig.yaml'), 'utf8').replace('resolution: [1920, 1200]', 'resolution: [160, 100]'));
  const child = spawn(process.execPath, [BIN, 'warp', rig, '--raw-in', '64x64'], { stdio: ['pipe', 'pipe', 'pipe'] });
  let stderr = '';
  child.stderr.on('data', (d) => (stderr += String(d)));
  let got = 0;
  child.stdout.on('data', (d: Buffer) => {
    got += d.length;
    if (got >= 1000) child.stdout.destroy(); // the reader closes its end
  });
  child.stdin.on('error', () => {}); // skyfold may stop reading before we stop writing
  const frame = Buffer.alloc(64 * 64 * 3, 128);
  let sent = 0;
  const pump = () => {
    while (sent < 200 && child.stdin.writable) {
      sent++;
      if (!child.stdin.write(frame)) return void child.stdin.once('drain', pump);
    }
    child.stdin.end();
  };
  pump();
  const code = await new Promise<number | null>((resolve) => child.on('close', (c) => resolve(c)));
  expect(stderr).not.toMatch(/internal error|EPIPE/);
  expect(code, stderr).toBe(0);
  expect(got).toBeGreaterThanOrEqual(1000);
});
