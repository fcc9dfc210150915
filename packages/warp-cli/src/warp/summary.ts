/** The end of a batch for the person or the script that ran it. */
import { printJson } from '../format.js';
import { info } from '../messages.js';

export interface BatchSummary {
  done: number;
  skipped: number;
  failed: number;
  failures: { input: string; reason: string }[];
  total: number;
  output: string;
  seconds: number;
}

/** One JSON line with `json`, else a line of counts and one line per failed frame on standard error. */
export function printSummary(s: BatchSummary, json: boolean | undefined): void {
  if (json) {
    printJson(s);
    return;
  }
  info(`${s.done} warped, ${s.skipped} already done, ${s.failed} failed of ${s.total} frames in ${s.seconds.toFixed(1)} s -> ${s.output}`);
  for (const f of s.failures) info(`  failed: ${f.input}: ${f.reason}`);
}
