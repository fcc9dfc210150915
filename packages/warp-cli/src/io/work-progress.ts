/**
 * Progress of one long computation (simulate's inverse trace, plan's search) on a terminal: a bar redrawn in place at
 * most ten times a second, and nothing when standard error is not a terminal, in CI or with --json.
 */
import { runContext } from './run-context.js';

export class WorkProgress {
  private readonly start = performance.now();
  private lastDraw = 0;
  private drawn = false;
  private readonly stream = runContext().stderr as NodeJS.WritableStream & { isTTY?: boolean };
  private readonly on: boolean;

  constructor(private readonly what: string, enabled = true) {
    this.on = enabled && Boolean(this.stream.isTTY) && runContext().env.CI !== 'true';
  }

  /** `done` of `total` steps finished. */
  update(done: number, total: number): void {
    if (!this.on) return;
    const now = performance.now();
    if (now - this.lastDraw < 100 && done < total) return;
    this.lastDraw = now;
    const share = total > 0 ? done / total : 1;
    const secs = (now - this.start) / 1000;
    const left = share > 0 ? (secs * (1 - share)) / share : Number.NaN;
    const width = 28;
    const filled = Math.round(share * width);
    this.stream.write(`\r${this.what} [${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${Math.round(share * 100)}%${Number.isFinite(left) && share < 1 ? `  ${Math.ceil(left)}s left` : ''} `);
    this.drawn = true;
  }

  /** Ends the bar's line, if one was drawn. */
  finish(): void {
    if (this.drawn) this.stream.write('\n');
    this.drawn = false;
  }
}
