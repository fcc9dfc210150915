/** Running ffmpeg and ffprobe: an argument array (never a shell string), stderr kept for the message shown. */
import { spawn, type ChildProcess } from 'node:child_process';

export interface ChildResult {
  code: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stderr: string;
}

/** Runs a program to the end and collects its output as text. */
export function runToEnd(program: string, args: string[]): Promise<ChildResult> {
  return new Promise((resolve, reject) => {
    const child = spawn(program, args, { stdio: ['ignore', 'pipe', 'pipe'] });
    const out: Buffer[] = [];
    const err = new StderrTail(child);
    child.stdout!.on('data', (b: Buffer) => out.push(b));
    child.on('error', reject);
    child.on('close', (code, signal) => resolve({ code, signal, stdout: Buffer.concat(out).toString('utf8'), stderr: err.text }));
  });
}

/** Keeps the last few kilobytes of a child's stderr: enough for its error, bounded for a long run. */
export class StderrTail {
  private chunks: string[] = [];
  private size = 0;
  constructor(child: ChildProcess, private readonly limit = 16_384) {
    child.stderr?.on('data', (b: Buffer) => {
      this.chunks.push(b.toString('utf8'));
      this.size += b.length;
      while (this.size > this.limit && this.chunks.length > 1) this.size -= this.chunks.shift()!.length;
    });
  }

  get text(): string {
    return this.chunks.join('');
  }

  /** The child's first non-empty line without ffmpeg's "[muxer @ 0x…]" prefix: the cause, for a one-line error. */
  get firstLine(): string {
    const line = this.text.split('\n').map((l) => l.trim()).find(Boolean) ?? '';
    return line.replace(/^(\[[^\]]* @ 0x[0-9a-f]+\]\s*)+/, '');
  }

  /** The child's last non-empty line. */
  get lastLine(): string {
    const lines = this.text.split('\n').map((l) => l.trim()).filter(Boolean);
    return lines[lines.length - 1] ?? '';
  }
}

/** A child that is ended when skyfold stops early; `exited` resolves with its code. */
export interface RunningChild {
  child: ChildProcess;
  stderr: StderrTail;
  exited: Promise<number | null>;
}

export function startChild(program: string, args: string[], stdin: 'pipe' | 'ignore'): RunningChild {
  const child = spawn(program, args, { stdio: [stdin, stdin === 'pipe' ? 'ignore' : 'pipe', 'pipe'] });
  const stderr = new StderrTail(child);
  const exited = new Promise<number | null>((resolve) => {
    child.on('error', () => resolve(-1));
    child.on('close', (code) => resolve(code));
  });
  return { child, stderr, exited };
}

/**
 * Ends a child early. Its pipes are closed too: a child's 'close' waits for its stdout to reach
 * its end, which never happens while frames nobody will read sit in the pipe.
 */
export function stopChild(r: RunningChild | undefined): void {
  if (!r) return;
  r.child.stdout?.destroy();
  r.child.stdin?.destroy();
  if (r.child.exitCode === null && r.child.signalCode === null) r.child.kill('SIGKILL');
}
