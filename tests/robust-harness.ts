/**
 * In-process runs of the `skyfold` entry point for the robustness tests: standard output and error
 * captured, the exit code `main` resolves to, and a check that no run leaves process.exitCode behind.
 */
import { main } from '@skyfold/warp-cli';

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

/** Runs `skyfold ...args` in this process (paths should be absolute). */
export async function runCli(...args: string[]): Promise<CliRun> {
  const out: string[] = [];
  const err: string[] = [];
  const w1 = process.stdout.write.bind(process.stdout);
  const w2 = process.stderr.write.bind(process.stderr);
  const capture = (sink: string[]) =>
    ((chunk: string | Uint8Array, ...rest: unknown[]) => {
      sink.push(typeof chunk === 'string' ? chunk : Buffer.from(chunk).toString('utf8'));
      const cb = rest.find((r) => typeof r === 'function') as (() => void) | undefined;
      cb?.();
      return true;
    }) as typeof process.stdout.write;
  process.exitCode = undefined;
  process.stdout.write = capture(out);
  process.stderr.write = capture(err);
  let code: number;
  try {
    code = await main(['node', 'skyfold', ...args]);
  } finally {
    process.stdout.write = w1;
    process.stderr.write = w2;
    process.exitCode = undefined;
  }
  return { code, stdout: out.join(''), stderr: err.join('') };
}

/** Exit 2 with exactly one short line on standard error naming `file`, no stack and no internal error. */
export function userErrorLine(r: CliRun, file: string): string | undefined {
  const lines = r.stderr.trimEnd().split('\n');
  if (r.code !== 2 || lines.length !== 1 || !lines[0].startsWith('skyfold: ') || !lines[0].includes(file) || /internal error/.test(lines[0])) return undefined;
  return lines[0];
}
