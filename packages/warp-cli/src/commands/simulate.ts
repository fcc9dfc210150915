/** `skyfold simulate`: what the audience would see of a warped frame, as a dome master. */
import { Option, type Command } from 'commander';
import { remap, simulationMap } from '@skyfold/warp-core';
import { readRig } from '../io/document-file.js';
import { decodeImage, encodeImage, FrameError, formatOfPath } from '../io/image-codec.js';
import { writeOutputFile } from '../io/output-file.js';
import { UserError } from '../errors.js';
import { printJson } from '../format.js';
import { parsePositiveInt } from '../options.js';
import { writeOut } from '../io/run-context.js';
import { WorkProgress } from '../io/work-progress.js';

export function registerSimulate(program: Command): void {
  program
    .command('simulate')
    .description('show what the audience would see of a warped frame: a dome master of the dome as projected')
    .argument('<rig>', 'rig file (YAML or JSON), or a .glb baked by skyfold')
    .argument('<warped>', 'a warped projector frame (as skyfold warp writes it)')
    .requiredOption('-o, --output <file>', 'dome-master image to write (.png, .jpg, .tif, .webp)')
    .option('--size <n>', 'dome-master size in pixels', (s) => parsePositiveInt(s), 1024)
    .addOption(new Option('--brightness <model>', "'physical': light per dome area of each projector pixel; 'none': geometry only").choices(['physical', 'none']).default('physical'))
    .option('--json', 'print a JSON summary')
    .addHelpText('after', '\nExamples:\n  skyfold simulate rig.yaml warped/frame_0001.png -o seen.png\n  skyfold simulate rig.yaml warped/frame_0001.png -o seen.png --size 2048 --brightness none')
    .action(async (rigPath: string, warpedPath: string, opts: { output: string; size: number; brightness: 'physical' | 'none'; json?: boolean }) => {
      const rig = readRig(rigPath);
      const format = formatOfPath(opts.output);
      if (!format) throw new UserError(`${opts.output}: expected an image file name ending in .png, .jpg, .tif or .webp`);
      let frame;
      try {
        frame = await decodeImage(warpedPath);
      } catch (e) {
        if (e instanceof FrameError) throw new UserError(`${warpedPath}: ${e.message}`);
        throw e;
      }
      const [W, H] = rig.projector.resolution;
      if (frame.width !== W || frame.height !== H) throw new UserError(`${warpedPath}: is ${frame.width}x${frame.height}; the rig's projector is ${W}x${H}`);
      const progress = new WorkProgress('simulate', !opts.json);
      const map = simulationMap(rig, opts.size, { brightness: opts.brightness, onRow: (done, total) => progress.update(done, total) });
      progress.finish();
      const seen = remap(frame, map, { filter: 'bilinear' });
      writeOutputFile(opts.output, await encodeImage(seen, { format }));
      let covered = 0;
      let inside = 0;
      for (let k = 0; k < map.gain.length; k++) {
        const i = k % opts.size;
        const j = (k - i) / opts.size;
        if (((i + 0.5) / opts.size - 0.5) ** 2 + ((j + 0.5) / opts.size - 0.5) ** 2 <= 0.25) inside++;
        if (map.gain[k] > 0) covered++;
      }
      const summary = { output: opts.output, size: opts.size, coveredFraction: covered / inside, brightness: opts.brightness };
      if (opts.json) printJson(summary);
      else writeOut(`wrote ${opts.output} (${opts.size}x${opts.size}); ${(summary.coveredFraction * 100).toFixed(1)}% of the dome master's circle is lit\n`);
    });
}
