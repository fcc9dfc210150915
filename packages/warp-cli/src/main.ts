/** The `skyfold` command: builds the program, runs it, and turns user errors into one line and exit 2. */
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
import { VERSION } from './version.js';

export function buildProgram(): Command {
  const program = new Command('skyfold')
    .description('Pre-warp fulldome frames for a projector bounced off a spherical mirror in a dome.')
    .version(VERSION)
    .showSuggestionAfterError(true)
    .exitOverride()
    .configureOutput({ outputError: (str, write) => write(str.split('\n')[0] + '\n') });
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

/** Runs the CLI; resolves to the exit code (never throws for user errors). */
export async function main(argv: string[]): Promise<number> {
  const program = buildProgram();
  try {
    await program.parseAsync(argv);
    return typeof process.exitCode === 'number' ? process.exitCode : 0;
  } catch (e) {
    if (e instanceof CommanderError) {
      if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') return 0;
      return 2;
    }
    if (e instanceof UserError) {
      process.stderr.write(`skyfold: ${e.message}\n`);
      return e.exitCode;
    }
    const err = e as Error;
    process.stderr.write(`skyfold: internal error: ${err?.message ?? String(e)}\n`);
    if (process.env.SKYFOLD_DEBUG) process.stderr.write(`${err?.stack}\n`);
    return 3;
  }
}
