/** `skyfold probe`: traces projector pixels to the dome and the fisheye. */
import type { Command } from 'commander';
import { RAD, Tracer } from '@skyfold/warp-core';
import { readRig } from '../io/document-file.js';
import { fixed, lengthText, printJson, table } from '../format.js';
import { collect, parseNumberPair } from '../options.js';
import { writeOut } from '../io/run-context.js';

export function registerProbe(program: Command): void {
  program
    .command('probe')
    .description('trace projector pixels through the mirror: hit kind, fisheye (u, v), azimuth, altitude, dome point')
    .argument('<rig>', 'rig file (YAML or JSON), or a .glb baked by skyfold')
    .requiredOption('--pixel <x,y>', 'projector pixel coordinate (repeatable; pixel centres are at +0.5)', collect((s) => parseNumberPair(s, 'X,Y (two numbers)')))
    .option('--json', 'machine-readable output')
    .addHelpText('after', '\nExamples:\n  skyfold probe rig.yaml --pixel 960.5,600.5\n  skyfold probe rig.yaml --pixel 10,10 --pixel 1900,1190 --json')
    .action((rigPath: string, opts: { pixel: [number, number][]; json?: boolean }) => {
      const rig = readRig(rigPath);
      const tracer = new Tracer(rig);
      const results = opts.pixel.map(([x, y]) => {
        const h = tracer.pixel(x, y);
        if (h.kind === 'mirror-miss' || h.kind === 'open') return { pixel: [x, y], hit: h.kind };
        return { pixel: [x, y], hit: h.kind, fisheye: h.fisheye, azimuth: h.azimuth * RAD, altitude: h.altitude * RAD, domePoint: h.domePoint };
      });
      if (opts.json) {
        printJson({ results });
        return;
      }
      const rows = results.map((r) =>
        'fisheye' in r
          ? [
              `${r.pixel[0]}, ${r.pixel[1]}`,
              r.hit,
              `${fixed(r.fisheye![0], 5)}, ${fixed(r.fisheye![1], 5)}`,
              fixed(r.azimuth!, 3),
              fixed(r.altitude!, 3),
              r.domePoint!.map((c) => lengthText(c, rig.units)).join(', '),
            ]
          : [`${r.pixel[0]}, ${r.pixel[1]}`, r.hit, '-', '-', '-', '-'],
      );
      writeOut(table(['pixel', 'hit', 'fisheye u, v', 'azimuth', 'altitude', `dome point (x, y, z)`], rows) + '\n');
    });
}
