/** `skyfold init`: a commented starter rig for the demo scenario. */
import { Option, type Command } from 'commander';
import { starterRigText } from '../demo-rig.js';
import { refuseToOverwrite, writeOutputFile } from '../io/output-file.js';
import { printJson } from '../format.js';
import { writeOut } from '../io/run-context.js';

export function registerInit(program: Command): void {
  program
    .command('init')
    .description('write a commented starter rig file (the demo dome) to edit with your own measurements')
    .option('-o, --output <file>', 'where to write it (default: standard output)')
    .addOption(new Option('--units <units>', 'metres, or feet and inches').choices(['m', 'ft']).default('m'))
    .option('--force', 'overwrite an existing file')
    .option('--json', 'print a JSON summary')
    .addHelpText('after', '\nExamples:\n  skyfold init -o rig.yaml\n  skyfold init --units ft -o rig.yaml')
    .action((opts: { output?: string; units: 'm' | 'ft'; force?: boolean; json?: boolean }) => {
      const text = starterRigText(opts.units);
      if (!opts.output) {
        if (opts.json) printJson({ rig: text });
        else writeOut(text);
        return;
      }
      refuseToOverwrite(opts.output, opts.force);
      writeOutputFile(opts.output, text);
      if (opts.json) printJson({ file: opts.output, units: opts.units });
      else writeOut(`wrote ${opts.output} (units: ${opts.units}); edit it with your measurements, then try: skyfold probe ${opts.output} --pixel 960,600\n`);
    });
}
