/** `simulate` shows its progress on a terminal, as warp does, and stays silent otherwise. */
import { rmSync } from 'node:fs';
import { join } from 'node:path';
import { Readable, Writable } from 'node:stream';
import sharp from 'sharp';
import { afterAll, describe, expect, it } from 'vitest';
import { run } from '@skyfold/warp-cli';
import { FIXTURES, tempDir } from './support.js';

const RIG = join(FIXTURES, 'golden', 'warp-rig-320x200.yaml');
const dir = tempDir('skyfold-simprog-');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Runs simulate with a standard error that says it is (or is not) a terminal; returns what it got. */
async function simulate(tty: boolean, extra: string[] = []): Promise<{ code: number; err: string }> {
  const frame = join(dir, 'frame.png');
  await sharp({ create: { width: 320, height: 200, channels: 3, background: { r: 200, g: 200, b: 200 } } }).png().toFile(frame);
  let err = '';
  const stderr = Object.assign(new Writable({ write: (c: Buffer, _e, done) => ((err += c.toString()), done()) }), { isTTY: tty });
  const stdout = new Writable({ write: (_c, _e, done) => done() });
  const env = { ...process.env, CI: undefined, SKYFOLD_DEBUG: '' };
  const code = await run(['simulate', RIG, frame, '-o', join(dir, `seen-${tty}.png`), '--size', '96', ...extra], { stdin: Readable.from([]), stdout, stderr, cwd: dir, env });
  return { code, err };
}

describe('simulate progress', () => {
  it('draws a bar that reaches 100% on a terminal and ends its line', async () => {
    const { code, err } = await simulate(true);
    expect(code, err).toBe(0);
    expect(err).toMatch(/^\rsimulate \[[#.]{28}\] \d+%/);
    expect(err).toMatch(/\rsimulate \[#{28}\] 100% +\n$/);
  });

  it('writes nothing to a standard error that is not a terminal, nor with --json', async () => {
    expect((await simulate(false)).err).toBe('');
    expect((await simulate(true, ['--json'])).err).toBe('');
  });
});
