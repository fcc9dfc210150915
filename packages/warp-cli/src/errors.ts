/** Errors meant for the person at the keyboard: one line, no stack trace. */
export class UserError extends Error {
  constructor(message: string, readonly exitCode: 1 | 2 = 2) {
    super(message);
    this.name = 'UserError';
  }
}

/** Exit codes of every command (DESIGN.md "Commands"). */
export const EXIT_OK = 0;
export const EXIT_PARTIAL = 1;
export const EXIT_BAD_INPUT = 2;
/** A defect in skyfold: no input, however malformed, may reach it. */
export const EXIT_INTERNAL = 3;
