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
import { UserError } from './errors.js';
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
      writeErr: (str) => writeErr(str),
      outputError: (str, write) => write(str.split('\n')[0] + '\n'),
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
  for (const c of program.commands) c.exitOverride();
  return program;
}

/** Parses and runs one command line; resolves to the exit code (never throws for user errors). */
async function runProgram(args: string[]): Promise<number> {
  const program = buildProgram();
  try {
    await program.parseAsync(args, { from: 'user' });
    return runContext().exitCode;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') return 0;
      return 2;
    }
    if (e instanceof UserError) {
      writeErr(`skyfold: ${e.message}\n`);
      return e.exitCode;
    }
    const err = e as Error;
    writeErr(`skyfold: internal error: ${err?.message ?? String(e)}\n`);
    if (runContext().env.SKYFOLD_DEBUG) writeErr(`${err?.stack}\n`);
    return 3;
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
