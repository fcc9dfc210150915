/**
 * What the CLI tests share: the repository's paths and demo rig, temporary folders, the program run
 * in-process on captured streams, and the real binary spawned as a user runs it.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable, Writable } from 'node:stream';
import { fileURLToPath } from 'node:url';
import { afterAll } from 'vitest';
import { run } from '@skyfold/warp-cli';

export const ROOT = fileURLToPath(new URL('..', import.meta.url));
export const BIN = join(ROOT, 'node_modules', '.bin', 'skyfold');
export const FIXTURES = join(ROOT, 'fixtures');
/** The demo rig of the repository (fixtures/demo-rig.yaml) and the measurements made of it. */
export const DEMO_RIG = join(FIXTURES, 'demo-rig.yaml');
export const DEMO_MEASUREMENTS = join(FIXTURES, 'demo-measurements.yaml');

/** The demo rig's text with a smaller projector, for fast warps. */
export function demoRigText(resolution?: [number, number]): string {
  const text = readFileSync(DEMO_RIG, 'utf8');
  if (!resolution) return text;
  const small = text.replace(/resolution:\s*\[\s*\d+\s*,\s*\d+\s*\]/, `resolution: [${resolution[0]}, ${resolution[1]}]`);
  if (small === text) throw new Error('fixtures/demo-rig.yaml: no projector resolution line to shrink');
  return small;
}

/** A fresh temporary folder, removed when the test file's tests are done (call at the top level or in a hook). */
export function tempDir(prefix: string): string {
  const dir = mkdtempSync(join(tmpdir(), `skyfold-${prefix}-`));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  return dir;
}

export interface Run {
  /** The exit code (null when a spawned binary was ended by a signal). */
  code: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stdoutBytes: Buffer;
  stderr: string;
}

export interface RunOptions {
  cwd?: string;
  /** Added to the environment; CI is "true" (no progress bar) and SKYFOLD_DEBUG empty unless given. */
  env?: Record<string, string | undefined>;
  /** Standard input (empty when not given). */
  input?: Buffer;
}

function environment(env: RunOptions['env']): Record<string, string | undefined> {
  return { ...process.env, CI: 'true', SKYFOLD_DEBUG: '', ...env };
}

function sink(): { stream: Writable; bytes: () => Buffer } {
  const chunks: Buffer[] = [];
  // copied: a writer may reuse its buffer once write() has returned
  const stream = new Writable({ write: (chunk: Buffer, _enc, done) => (chunks.push(Buffer.from(chunk)), done()) });
  return { stream, bytes: () => Buffer.concat(chunks) };
}

/** Runs `skyfold ...args` in this process (the exported program) on captured streams. */
export async function skyfold(args: string[], opts: RunOptions = {}): Promise<Run> {
  const out = sink();
  const err = sink();
  const stdin = Readable.from(opts.input ? [opts.input] : []);
  const code = await run(args, { stdin, stdout: out.stream, stderr: err.stream, cwd: opts.cwd, env: environment(opts.env) });
  const stdoutBytes = out.bytes();
  return { code, signal: null, stdout: stdoutBytes.toString(), stdoutBytes, stderr: err.bytes().toString() };
}

/** Collects a child's output until it closes, feeding it `input` (or nothing) on standard input. */
export function collect(child: ChildProcess, input?: Buffer): Promise<Run> {
  const out: Buffer[] = [];
  let err = '';
  child.stdout?.on('data', (b: Buffer) => out.push(b));
  child.stderr?.on('data', (b: Buffer) => (err += b.toString()));
  if (child.stdin) {
    child.stdin.on('error', () => {}); // the child may exit before reading everything
    child.stdin.end(input);
  }
  return new Promise((resolve, reject) => {
    child.on('error', reject);
    child.on('close', (code, signal) => {
      const stdoutBytes = Buffer.concat(out);
      resolve({ code, signal, stdout: stdoutBytes.toString(), stdoutBytes, stderr: err });
    });
  });
}

/** Starts the installed binary (an argument array, no shell); `done` resolves when it has closed. */
export function spawnSkyfold(args: string[], opts: RunOptions = {}): { child: ChildProcess; done: Promise<Run> } {
  const child = spawn(BIN, args, { cwd: opts.cwd, env: environment(opts.env) });
  return { child, done: collect(child, opts.input) };
}

/**
 * Polls `pred` every few milliseconds while `child` runs: true once it holds, false if the child
 * ends first. No clock: on a busy machine the child is simply slower.
 */
export function whileRunning(child: ChildProcess, pred: () => boolean): Promise<boolean> {
  let ended = false;
  child.once('close', () => (ended = true));
  return new Promise((resolve) => {
    const tick = () => {
      if (pred()) resolve(true);
      else if (ended || child.exitCode !== null || child.signalCode !== null) resolve(pred());
      else setTimeout(tick, 5);
    };
    tick();
  });
}
