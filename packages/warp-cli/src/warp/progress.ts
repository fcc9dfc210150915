/** Progress for long runs: a bar on a terminal, plain lines otherwise. */
import { runContext } from '../io/run-context.js';

function duration(s: number): string {
  if (!Number.isFinite(s)) return '?';
  if (s < 60) return `${Math.round(s)}s`;
  if (s < 3600) return `${Math.floor(s / 60)}m${String(Math.round(s % 60)).padStart(2, '0')}s`;
  return `${Math.floor(s / 3600)}h${String(Math.floor((s % 3600) / 60)).padStart(2, '0')}m`;
}

export class Progress {
  private readonly start = performance.now();
  private done = 0;
  private lastDraw = 0;
  constructor(
    private readonly total: number,
    private readonly stream: NodeJS.WritableStream & { isTTY?: boolean } = runContext().stderr,
    private readonly enabled = true,
  ) {}

  private get tty(): boolean {
    return Boolean(this.stream.isTTY) && runContext().env.CI !== 'true';
  }

  /** A frame finished (ok or failed); `label` names it on plain output. */
  tick(label: string, ok: boolean, note = ''): void {
    this.done++;
    if (!this.enabled) return;
    const secs = (performance.now() - this.start) / 1000;
    const fps = this.done / Math.max(secs, 1e-9);
    const left = (this.total - this.done) / fps;
    if (this.tty) {
      const now = performance.now();
      if (now - this.lastDraw < 100 && this.done < this.total) return;
      this.lastDraw = now;
      const width = 28;
      const filled = Math.round((this.done / Math.max(1, this.total)) * width);
      const bar = '#'.repeat(filled) + '.'.repeat(width - filled);
      this.stream.write(`\r[${bar}] ${this.done}/${this.total} frames  ${fps.toFixed(2)} fps  ${duration(left)} left `);
      if (this.done >= this.total) this.stream.write('\n');
    } else {
      this.stream.write(`${ok ? 'warped' : 'FAILED'} ${this.done}/${this.total} ${label}${note ? ` (${note})` : ''}  ${fps.toFixed(2)} fps, ${duration(left)} left\n`);
    }
  }

  finish(): void {
    if (this.enabled && this.tty && this.done < this.total) this.stream.write('\n');
  }
}
