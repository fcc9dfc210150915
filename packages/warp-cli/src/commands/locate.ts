/** `skyfold locate`: the inverse of probe — which projector pixel lights a dome direction. */
import type { Command } from 'commander';
import { DEG, locateDirection, Tracer } from '@skyfold/warp-core';
import { readRig } from '../io/document-file.js';
import { fixed, printJson, table } from '../format.js';
import { collect, parseDirection } from '../options.js';
import { writeOut } from '../io/run-context.js';

export function registerLocate(program: Command): void {
  program
    .command('locate')
    .description('find the projector pixel that lights a dome direction (azimuth, altitude in degrees from the content eye)')
    .argument('<rig>', 'rig file (YAML or JSON), or a .glb baked by skyfold')
    .requiredOption('--direction <az,alt>', 'dome direction in degrees (repeatable): azimuth 0 = front, 90 = right; altitude 0 = springline, 90 = zenith', collect((s) => parseDirection(s)))
    .option('--json', 'machine-readable output')
    .addHelpText('after', '\nExamples:\n  skyfold locate rig.yaml --direction 0,90\n  skyfold locate rig.yaml --direction 0,30 --direction 90,30 --json')
    .action((rigPath: string, opts: { direction: [number, number][]; json?: boolean }) => {
      const rig = readRig(rigPath);
      const tracer = new Tracer(rig);
      const results = opts.direction.map(([az, alt]) => {
        const r = locateDirection(tracer, az * DEG, alt * DEG);
        return r.pixel ? { azimuth: az, altitude: alt, pixel: r.pixel } : { azimuth: az, altitude: alt, pixel: null, reason: r.reason };
      });
      if (opts.json) {
        printJson({ results });
        return;
      }
      const rows = results.map((r) => [fixed(r.azimuth, 3), fixed(r.altitude, 3), r.pixel ? `${fixed(r.pixel[0], 3)}, ${fixed(r.pixel[1], 3)}` : '-', 'reason' in r ? String(r.reason) : '']);
      writeOut(table(['azimuth', 'altitude', 'projector pixel x, y', 'note'], rows) + '\n');
    });
}
