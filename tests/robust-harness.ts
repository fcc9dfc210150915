/**
 * In-process runs of `skyfold` for the robustness tests, through the shared runner of tests/support.ts
 * (captured streams, the exit code the program returns), and the check of a user error's one line.
 */
import { skyfold } from './support.js';

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

/** Runs `skyfold ...args` in this process (paths should be absolute). */
export async function runCli(...args: string[]): Promise<CliRun> {
  const r = await skyfold(args);
  return { code: r.code ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/**
 * Exit 2 with exactly one error line on standard error naming `file` (warnings about the rig may come
 * before it, each on its own line), no stack and no internal error; returns that line.
 */
export function userErrorLine(r: CliRun, file: string): string | undefined {
  const lines = r.stderr.trimEnd().split('\n').filter((l) => !l.startsWith('skyfold: warning: '));
  if (r.code !== 2 || lines.length !== 1 || !lines[0].startsWith('skyfold: ') || !lines[0].includes(file) || /internal error/.test(lines[0])) return undefined;
  return lines[0];
}
