/** Messages to standard error. */
export function warn(message: string): void {
  process.stderr.write(`skyfold: warning: ${message}\n`);
}

export function info(message: string): void {
  process.stderr.write(`${message}\n`);
}
