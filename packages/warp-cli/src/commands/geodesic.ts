/** `skyfold geodesic`: a class I icosahedral geodesic dome as an OBJ for `dome.mesh`, and its build sheet. */
import { basename } from 'node:path';
import { InvalidArgumentError, Option, type Command } from 'commander';
import { DEG, geodesicDome, geodesicObj, isLengthUnit, LengthSyntaxError, METRES_PER_UNIT, parseLengthString, type GeodesicDome, type LengthUnit } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { fixed, lengthText, printJson, table } from '../format.js';
import { parseNumberIn } from '../options.js';
import { refuseToOverwrite, writeOutputFile } from '../io/output-file.js';
import { writeOut } from '../io/run-context.js';

interface GeodesicCliOptions {
  frequency: number;
  radius?: string;
  diameter?: string;
  units: LengthUnit;
  truncation?: number;
  keepAbove?: string;
  skirtTo?: string;
  azimuth: number;
  force?: boolean;
  json?: boolean;
}

/** "5/8", "1/2", "0.625" → a fraction of the sphere in (0, 1]. */
function parseFraction(text: string): number {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  const f = m ? Number(m[1]) / Number(m[2]) : Number(text);
  if (text.trim() === '' || !Number.isFinite(f) || !(f > 0 && f <= 1)) throw new InvalidArgumentError(`expected a fraction of the sphere such as 1/2, 3/8 or 5/8 (more than 0, at most 1), got "${text}"`);
  return f;
}

function parseFrequency(text: string): number {
  const n = Number(text);
  if (text.trim() === '' || !Number.isInteger(n) || n < 1 || n > 64) throw new InvalidArgumentError(`expected a whole number from 1 to 64, got "${text}"`);
  return n;
}

/** A length option: a bare number in `units`, or a string with its own unit ("8 ft", "2.4 m"). Metres. */
function lengthOption(flag: string, text: string, units: LengthUnit): number {
  const bare = Number(text);
  if (text.trim() !== '' && Number.isFinite(bare)) return bare * METRES_PER_UNIT[units];
  try {
    return parseLengthString(text);
  } catch (e) {
    if (e instanceof LengthSyntaxError) throw new UserError(`${flag}: expected a length (a number in --units, or with a unit such as "8 ft 2 in" or "2.4 m"): ${e.message}, got "${text}"`);
    throw e;
  }
}

export function registerGeodesic(program: Command): void {
  program
    .command('geodesic')
    .description('write a class I icosahedral geodesic dome as an OBJ for dome.mesh, and print its build sheet')
    .argument('<out.obj>', 'OBJ file to write (in --units)')
    .requiredOption('--frequency <n>', 'how many parts each icosahedron edge is divided into (2V, 3V, ...)', parseFrequency)
    .option('--radius <length>', 'sphere radius (a number in --units, or "8 ft")')
    .option('--diameter <length>', 'sphere diameter, instead of --radius')
    .addOption(new Option('--units <unit>', 'units of bare numbers, of the OBJ and of the build sheet').choices(['m', 'cm', 'mm', 'ft', 'in']).default('m'))
    .option('--truncation <fraction>', 'keep the faces whose centre is in this top fraction of the sphere\'s height (1/2, 3/8, 5/8, ...; default 1/2)', parseFraction)
    .option('--keep-above <height>', 'keep the faces whose three corners are at or above this height (instead of --truncation)')
    .option('--skirt-to <height>', 'a vertical wall from the base ring down to this height (the floor, below the springline: e.g. -2 ft)')
    .option('--azimuth <degrees>', 'turn the pattern: the zenith hub\'s first neighbour at this azimuth', parseNumberIn(-360, 360), 0)
    .option('--force', 'overwrite an existing file')
    .option('--json', 'print the build sheet as JSON')
    .addHelpText(
      'after',
      '\nExamples:\n  skyfold geodesic dome.obj --frequency 3 --radius 2.5 --truncation 5/8\n  skyfold geodesic school.obj --frequency 4 --diameter "16 ft" --units ft --skirt-to "-2 ft 6 in"',
    )
    .action((out: string, opts: GeodesicCliOptions) => {
      if (!isLengthUnit(opts.units)) throw new UserError(`--units: expected m, cm, mm, ft or in, got "${opts.units}"`);
      const units = opts.units;
      if ((opts.radius === undefined) === (opts.diameter === undefined)) throw new UserError('give the size as --radius or --diameter (one of them)');
      if (opts.truncation !== undefined && opts.keepAbove !== undefined) throw new UserError('--truncation and --keep-above both choose which faces to keep: give one');
      const radius = opts.radius !== undefined ? lengthOption('--radius', opts.radius, units) : lengthOption('--diameter', opts.diameter!, units) / 2;
      if (!(radius > 0) || radius > 1000) throw new UserError(`${opts.radius !== undefined ? '--radius' : '--diameter'}: expected a positive length up to 1 km, got "${opts.radius ?? opts.diameter}"`);
      const keepAbove = opts.keepAbove !== undefined ? lengthOption('--keep-above', opts.keepAbove, units) : undefined;
      const skirtTo = opts.skirtTo !== undefined ? lengthOption('--skirt-to', opts.skirtTo, units) : undefined;
      const fraction = keepAbove === undefined ? (opts.truncation ?? 1 / 2) : undefined;
      let dome: GeodesicDome;
      try {
        dome = geodesicDome({ frequency: opts.frequency, radius, keepAbove, keepFraction: fraction, skirtTo, azimuth: opts.azimuth * DEG });
      } catch (e) {
        if (!(e instanceof RangeError)) throw e;
        if (/skirt/.test(e.message)) throw new UserError(`--skirt-to: the wall must reach below the base ring (its lowest hub is at ${lengthText(lowestHub(opts, radius, keepAbove, fraction), units)}), got "${opts.skirtTo}"`);
        throw new UserError(`--keep-above: no face lies at or above ${lengthText(keepAbove ?? 0, units)} (the dome's top is at ${lengthText(radius, units)})`);
      }
      refuseToOverwrite(out, opts.force);
      const cut = keepAbove !== undefined ? `faces with every corner at or above ${lengthText(keepAbove, units)}` : `${fractionText(fraction!)} of the sphere (faces centred at or above ${lengthText(radius * (1 - 2 * fraction!), units)})`;
      const title = `${opts.frequency}V class I icosahedral geodesic, radius ${lengthText(radius, units)}, ${cut}, azimuth ${opts.azimuth}`;
      writeOutputFile(
        out,
        geodesicObj(dome, 1 / METRES_PER_UNIT[units], [
          `skyfold geodesic: ${title}${skirtTo !== undefined ? `, skirt to ${lengthText(skirtTo, units)}` : ''}`,
          `units: ${units} (in a rig file: dome.mesh: ${basename(out)}, as a path from the rig file's folder, with dome.meshUnits: ${units} if the rig's units differ)`,
          'frame: origin at the centre of the springline circle, +z up, azimuth 0 toward +y, 90 toward +x',
        ]),
      );
      const struts = dome.struts.map((s) => ({ label: s.label, chordFactor: s.chordFactor, length: s.length / METRES_PER_UNIT[units], count: s.count }));
      const strutTotal = struts.reduce((a, s) => a + s.count, 0);
      if (opts.json) {
        printJson({
          file: out,
          frequency: opts.frequency,
          units,
          radius: radius / METRES_PER_UNIT[units],
          hubs: dome.hubs,
          struts,
          triangles: dome.triangleKinds,
          sphereTriangles: dome.sphereTriangles,
          skirtPanels: dome.skirtPanels,
          baseHeight: dome.baseHeight / METRES_PER_UNIT[units],
        });
        return;
      }
      const lines = [
        `wrote ${out}: ${title}`,
        `${dome.hubs} hubs, ${strutTotal} struts, ${dome.sphereTriangles} triangles; the base ring's lowest hub at ${lengthText(dome.baseHeight, units)}`,
        ...(dome.skirtPanels > 0 ? [`skirt: ${dome.skirtPanels} wall panels (two triangles each in the OBJ) down to ${lengthText(skirtTo!, units)}`] : []),
        '',
        table(['strut', 'chord factor', 'length', 'count'], dome.struts.map((s) => [s.label, fixed(s.chordFactor, 5), lengthText(s.length, units), String(s.count)])),
        '',
        table(['triangle', 'count'], dome.triangleKinds.map((k) => [k.sides, String(k.count)])),
        '',
        'lengths are chords between hub centres (chord factor x radius); cut struts to suit the hub system',
      ];
      writeOut(lines.join('\n') + '\n');
    });
}

function fractionText(f: number): string {
  for (const d of [2, 3, 4, 8, 16]) {
    const n = Math.round(f * d);
    if (Math.abs(n / d - f) < 1e-12) return n === d ? 'the whole' : `${n}/${d}`;
  }
  return String(f);
}

function lowestHub(opts: GeodesicCliOptions, radius: number, keepAbove: number | undefined, keepFraction: number | undefined): number {
  return geodesicDome({ frequency: opts.frequency, radius, keepAbove, keepFraction, azimuth: opts.azimuth * DEG }).baseHeight;
}
