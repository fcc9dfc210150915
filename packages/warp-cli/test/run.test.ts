/**
 * The exported program: each run talks to its own streams, folder and environment, and leaves the
 * process as it found it (working folder, exit code, signal listeners).
 */
import { existsSync, mkdtempSync, readFileSync, realpathSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable, Writable } from 'node:stream';
import { afterAll, describe, expect, it } from 'vitest';
import { run, type RunIO } from '../src/main.js';

const base = mkdtempSync(join(tmpdir(), 'skyfold-run-'));
afterAll(() => rmSync(base, { recursive: true, force: true }));

function folder(name: string): string {
  const dir = join(base, name);
  rmSync(dir, { recursive: true, force: true });
  return realpathSync(mkdtempSync(dir + '-'));
}

function capture(): { io: Partial<RunIO>; out: () => string; err: () => string } {
  const out: string[] = [];
  const err: string[] = [];
  const sink = (to: string[]) => new Writable({ write: (c: Buffer, _e, done) => (to.push(String(c)), done()) });
  return { io: { stdin: Readable.from([]), stdout: sink(out), stderr: sink(err), env: { CI: 'true' } }, out: () => out.join(''), err: () => err.join('') };
}

describe('run(args, io)', () => {
  it('writes to the given streams and reads relative paths in the given folder', async () => {
    const dir = folder('one');
    const c = capture();
    const before = process.cwd();
    expect(await run(['init', '-o', 'rig.yaml'], { ...c.io, cwd: dir })).toBe(0);
    expect(process.cwd()).toBe(before);
    expect(existsSync(join(dir, 'rig.yaml'))).toBe(true);
    expect(c.out()).toMatch(/^wrote rig\.yaml \(units: m\)/);
    expect(c.err()).toBe('');
    expect(await run(['probe', 'rig.yaml', '--pixel', '960,600', '--json'], { ...c.io, cwd: dir })).toBe(0);
    expect(JSON.parse(c.out().split('\n')[1]).results).toHaveLength(1);
  });

  it('runs at once in two folders each write into their own', async () => {
    const [a, b] = [folder('a'), folder('b')];
    const [ca, cb] = [capture(), capture()];
    const codes = await Promise.all([run(['init', '-o', 'rig.yaml'], { ...ca.io, cwd: a }), run(['init', '--units', 'ft', '-o', 'rig.yaml'], { ...cb.io, cwd: b })]);
    expect(codes).toEqual([0, 0]);
    expect(readFileSync(join(a, 'rig.yaml'), 'utf8')).toMatch(/^units: m$/m);
    expect(readFileSync(join(b, 'rig.yaml'), 'utf8')).toMatch(/^units: ft$/m);
    expect(ca.out()).toContain('(units: m)');
    expect(cb.out()).toContain('(units: ft)');
  });

  it('returns a user error as exit 2 with one line, and leaves process.exitCode and the signal listeners alone', async () => {
    const c = capture();
    const listeners = process.listenerCount('SIGINT');
    expect(await run(['probe', join(base, 'nowhere.yaml'), '--pixel', '1,1'], c.io)).toBe(2);
    expect(c.err()).toBe(`skyfold: ${join(base, 'nowhere.yaml')}: cannot read the rig file: no such file\n`);
    expect(c.out()).toBe('');
    expect(process.exitCode).toBeUndefined();
    expect(process.listenerCount('SIGINT')).toBe(listeners);
  });
});
