/** `plan` shows its progress on a terminal, as warp and simulate do, and stays silent otherwise. */
import { rmSync } from 'node:fs';
import { join } from 'node:path';
import { Readable, Writable } from 'node:stream';
import { afterAll, describe, expect, it } from 'vitest';
import { run } from '@skyfold/warp-cli';
import { FIXTURES, tempDir } from './support.js';

const RIG = join(FIXTURES, 'golden', 'warp-rig-320x200.yaml');
const dir = tempDir('skyfold-planprog-');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Runs a short plan with a standard error that says it is (or is not) a terminal; returns what it got. */
async function plan(tty: boolean, extra: string[] = []): Promise<{ code: number; err: string; out: string }> {
  let err = '';
  let out = '';
  const stderr = Object.assign(new Writable({ write: (c: Buffer, _e, done) => ((err += c.toString()), done()) }), { isTTY: tty });
  const stdout = new Writable({ write: (c: Buffer, _e, done) => ((out += c.toString()), done()) });
  const env = { ...process.env, CI: undefined, SKYFOLD_DEBUG: '' };
  const args = ['plan', RIG, '--vary', 'projector.position.y', '--evaluations', '20', '--rays', '1000', '-o', join(dir, `planned-${tty}-${extra.length}.yaml`), ...extra];
  const code = await run(args, { stdin: Readable.from([]), stdout, stderr, cwd: dir, env });
  return { code, err, out };
}

describe('plan progress', () => {
  it('draws a bar that reaches 100% on a terminal and ends its line; the table still goes to standard output', async () => {
    const { code, err, out } = await plan(true);
    expect(code, err).toBe(0);
    expect(err).toMatch(/^\rplan \[[#.]{28}\] \d+%/);
    expect(err).toMatch(/\rplan \[#{28}\] 100% +\n$/);
    expect(out).toMatch(/^current +\d/m);
    expect(out).toMatch(/^#1 +\d/m);
  });

  it('writes nothing to a standard error that is not a terminal, nor with --json', async () => {
    expect((await plan(false)).err).toBe('');
    const json = await plan(true, ['--json']);
    expect(json.err).toBe('');
    expect(JSON.parse(json.out).current.figures.coverage).toBeGreaterThan(0);
  });
});
