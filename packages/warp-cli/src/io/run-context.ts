/**
 * The streams, folder and environment one run of the program talks to. The binary runs with the
 * process's own; tests run the program in-process with captured streams and a temporary folder.
 * Every message, table and JSON line goes through here, never straight to `process.stdout`.
 */
import { AsyncLocalStorage } from 'node:async_hooks';

export interface RunIO {
  stdin: NodeJS.ReadableStream;
  stdout: NodeJS.WritableStream & { isTTY?: boolean };
  stderr: NodeJS.WritableStream & { isTTY?: boolean };
  /** The folder relative paths are read against. */
  cwd: string;
  env: Record<string, string | undefined>;
  /**
   * The frame worker module `warp` runs on its worker threads (default: skyfold's own). For a program
   * that embeds skyfold and wraps the worker; no command-line option or environment variable sets it.
   */
  frameWorker?: URL;
}

export interface RunContext extends RunIO {
  /** Set by a command that finished but not fully (1) or was stopped (130); 0 otherwise. */
  exitCode: number;
  /** `--fractions`: lengths in feet and inches are shown to the nearest sixteenth of an inch, not as decimals. */
  fractions?: boolean;
}

const storage = new AsyncLocalStorage<RunContext>();

function processIO(): RunIO {
  return { stdin: process.stdin, stdout: process.stdout, stderr: process.stderr, cwd: process.cwd(), env: process.env };
}

/** The context of the run this code is part of (outside any run: the process's own streams). */
export function runContext(): RunContext {
  return storage.getStore() ?? { ...processIO(), exitCode: 0 };
}

export function writeOut(text: string | Uint8Array): void {
  runContext().stdout.write(text);
}

export function writeErr(text: string | Uint8Array): void {
  runContext().stderr.write(text);
}

/** Records the run's exit code; the program returns it once the command's action has finished. */
export function setExitCode(code: number): void {
  runContext().exitCode = code;
}

// process.chdir is process-wide: runs that share a folder may overlap, a run in another folder waits
let leaseCwd: string | undefined;
let leaseCount = 0;
let leaseBefore = '';
let leaseReleased: Promise<void> = Promise.resolve();
let releaseLease: () => void = () => {};

async function enterFolder(cwd: string): Promise<void> {
  while (leaseCount > 0 && leaseCwd !== cwd) await leaseReleased;
  if (leaseCount === 0) {
    leaseBefore = process.cwd();
    process.chdir(cwd);
    leaseCwd = cwd;
    leaseReleased = new Promise((resolve) => (releaseLease = resolve));
  }
  leaseCount++;
}

function leaveFolder(): void {
  if (--leaseCount > 0) return;
  process.chdir(leaseBefore);
  leaseCwd = undefined;
  releaseLease();
}

/** Runs `fn` with `io` as the run's context; the working folder is `io.cwd` for the run's length. */
export async function withRunContext<T>(io: Partial<RunIO>, fn: () => Promise<T>): Promise<{ value: T; exitCode: number }> {
  const ctx: RunContext = { ...processIO(), ...io, exitCode: 0 };
  const moves = io.cwd !== undefined;
  if (moves) await enterFolder(io.cwd!);
  try {
    const value = await storage.run(ctx, fn);
    return { value, exitCode: ctx.exitCode };
  } finally {
    if (moves) leaveFolder();
  }
}
