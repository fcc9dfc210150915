/** Messages to standard error, and the core's notices and errors worded for the command line. */
import { OptionError, wordNotice as fillNotice, type LengthUnit, type Notice, type RigError } from '@skyfold/warp-core';
import { lengthText } from './format.js';
import { writeErr } from './io/run-context.js';

export function warn(message: string): void {
  writeErr(`skyfold: warning: ${message}\n`);
}

export function info(message: string): void {
  writeErr(`${message}\n`);
}

/** The CLI's flag for each core option a core message may name. */
const OPTION_FLAGS: Record<string, string> = {
  robust: '--robust',
  free: '--free',
  grid: '--grid',
  vary: '--vary',
};

export function optionFlag(option: string): string {
  return OPTION_FLAGS[option] ?? `--${option.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}`;
}

/** A core notice in the CLI's words: lengths in the rig's units, options by their flags. */
export function wordNotice(n: Notice, units: LengthUnit): string {
  return fillNotice(n, (metres) => lengthText(metres, units), optionFlag);
}

/** A core error in the CLI's words: an option error names the flag, a rig error its field. */
export function wordRigError(e: RigError): string {
  return e instanceof OptionError ? `${optionFlag(e.option)}: ${e.reason}` : e.message;
}
