/** The `skyfold` program: builds it, runs it on given streams, and turns user errors into one line and exit 2. */
import { Command, CommanderError } from 'commander';
import { registerBake } from './commands/bake.js';
import { registerInit } from './commands/init.js';
import { registerLocate } from './commands/locate.js';
import { registerProbe } from './commands/probe.js';
import { registerWarp } from './commands/warp.js';
import { registerSimulate } from './commands/simulate.js';
import { registerFit } from './commands/fit.js';
import { registerPattern } from './commands/pattern.js';
import { registerReport } from './commands/report.js';
import { registerPlan } from './commands/plan.js';
import { registerGeodesic } from './commands/geodesic.js';
import { registerLive } from './commands/live.js';
import { EXIT_BAD_INPUT, EXIT_INTERNAL, EXIT_OK, UserError } from './errors.js';
import { runContext, withRunContext, writeErr, writeOut, type RunIO } from './io/run-context.js';
import { VERSION } from './version.js';

export type { RunIO } from './io/run-context.js';

export function buildProgram(): Command {
  const program = new Command('skyfold')
    .description('Pre-warp fulldome frames for a projector bounced off a spherical mirror in a dome.')
    .version(VERSION)
    .showSuggestionAfterError(true)
    .exitOverride()
    .configureOutput({
      writeOut: (str) => writeOut(str),
      // errors are worded by usageError(), so commander writes only help here: help goes to standard output
      writeErr: (str) => writeOut(str),
      outputError: () => {},
    })
    .option('--fractions', 'show lengths in feet and inches to the nearest 1/16 in ("9 ft 1 1/2 in") instead of decimals (rigs in ft or in)')
    .hook('preAction', () => {
      if (program.opts().fractions) runContext().fractions = true;
    });
  registerInit(program);
  registerProbe(program);
  registerLocate(program);
  registerBake(program);
  registerWarp(program);
  registerSimulate(program);
  registerPattern(program);
  registerFit(program);
  registerReport(program);
  registerPlan(program);
  registerGeodesic(program);
  registerLive(program);
  for (const c of program.commands) c.exitOverride();
  return program;
}

/**
 * Commander's message for a bad command line, in skyfold's words and on one line:
 * "error: option '--filter <filter>' argument 'x' is invalid. Allowed choices are a, b." becomes
 * "--filter: expected one of a, b, got "x"", and "(Did you mean --json?)" joins the line.
 */
export function usageError(message: string): string {
  const [first, ...rest] = message.replace(/^error: /, '').split('\n');
  let line = first;
  const option = /^option '(?:-\w, )?(--[\w-]+)[^']*' argument '(.*)' is invalid\. (.*)$/s.exec(first);
  const argument = /^command-argument value '(.*)' is invalid for argument '(.*)'\. (.*)$/s.exec(first);
  const name = option ? option[1] : argument ? `<${argument[2]}>` : undefined;
  const value = option ? option[2] : argument?.[1];
  const reason = option ? option[3] : argument?.[3];
  if (name !== undefined && reason !== undefined) {
    const choices = /^Allowed choices are (.*)\.$/.exec(reason);
    line = `${name}: ${choices ? `expected one of ${choices[1]}, got "${value}"` : reason}`;
  }
  const suggestion = rest.map((l) => /^\(Did you mean (.*)\?\)$/.exec(l.trim())).find((m) => m);
  if (suggestion) line += `; did you mean ${suggestion[1]}?`;
  return line;
}

/** Parses and runs one command line; resolves to the exit code (never throws for user errors). */
async function runProgram(args: string[]): Promise<number> {
  const program = buildProgram();
  try {
    await program.parseAsync(args, { from: 'user' });
    return runContext().exitCode;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version') return EXIT_OK;
      // `skyfold help` asked for it; bare `skyfold` (or `skyfold pattern`) is a command line without a command
      if (e.code === 'commander.help') return e.exitCode === 0 ? EXIT_OK : EXIT_BAD_INPUT;
      writeErr(`skyfold: ${usageError(e.message)}\n`);
      return EXIT_BAD_INPUT;
    }
    if (e instanceof UserError) {
      writeErr(`skyfold: ${e.message}\n`);
      return e.exitCode;
    }
    const err = e as Error;
    writeErr(`skyfold: internal error: ${err?.message ?? String(e)}\n`);
    if (runContext().env.SKYFOLD_DEBUG) writeErr(`${err?.stack}\n`);
    return EXIT_INTERNAL;
  }
}

/**
 * Runs skyfold with the arguments after the command name (`['probe', 'rig.yaml', '--json']`) on the
 * given streams, folder and environment (each defaulting to the process's own); resolves to the exit code.
 */
export async function run(args: string[], io: Partial<RunIO> = {}): Promise<number> {
  return (await withRunContext(io, () => runProgram(args))).value;
}

/** The binary's entry: `argv` as in `process.argv` (node, script, then the arguments). */
export function main(argv: string[] = process.argv): Promise<number> {
  return run(argv.slice(2));
}
