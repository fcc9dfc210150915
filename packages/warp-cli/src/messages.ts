/** Messages to standard error. */
import { writeErr } from './io/run-context.js';

export function warn(message: string): void {
  writeErr(`skyfold: warning: ${message}\n`);
}

export function info(message: string): void {
  writeErr(`${message}\n`);
}
