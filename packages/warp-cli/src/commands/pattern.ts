/**
 * `skyfold pattern`: alignment patterns. `dome` draws a dome-master grid (rings, spokes, zenith target,
 * direction marks, numbered dots), optionally already warped for a rig; `markers` draws numbered
 * crosshairs at projector pixels for observation sessions, with a measurement-file template.
 */
import { extname } from 'node:path';
import { Option, type Command } from 'commander';
import {
  DEG,
  DOME_PATTERN_DEFAULTS,
  drawDomePattern,
  drawMarkerFrame,
  locateDirection,
  pixelMapFromRig,
  RAD,
  remap,
  REMAP_DEFAULTS,
  Tracer,
  wrapDegrees,
  type ImageBuffer,
  type Marker,
  type PatternDot,
  type RemapFilter,
} from '@skyfold/warp-core';
import { readRig } from '../io/document-file.js';
import { encodePng } from '../io/image-codec.js';
import { refuseToOverwrite, writeOutputFile } from '../io/output-file.js';
import { UserError } from '../errors.js';
import { fixed, printJson } from '../format.js';
import { warn } from '../messages.js';
import { collect, parseDirection, parseNumberIn, parseNumberPair, parsePositiveInt, parseSize } from '../options.js';
import { writeOut } from '../io/run-context.js';

async function writePng(path: string, img: ImageBuffer, force: boolean | undefined): Promise<void> {
  refuseToOverwrite(path, force);
  writeOutputFile(path, await encodePng(img));
}

function checkPngPath(path: string): void {
  if (extname(path).toLowerCase() !== '.png') throw new UserError(`${path}: expected a .png output file, got "${extname(path) || 'no extension'}"`);
}

function parseDot(text: string): PatternDot {
  const [az, alt] = parseDirection(text);
  return { azimuth: wrapDegrees(az) * DEG, altitude: alt * DEG };
}

const parseResolution = parseSize({ min: 1, max: { value: 8192, why: 'an 8K projector or dome master' }, separators: ',', what: 'WIDTHxHEIGHT in pixels, e.g. 1920x1200' });

type Target = { name: string; azimuth: number; altitude: number };

function parseTarget(text: string): Target {
  const t = text.trim();
  if (t === 'zenith') return { name: 'zenith', azimuth: 0, altitude: 90 };
  const rim = /^rim@(-?\d+(?:\.\d*)?)$/.exec(t);
  if (rim) return { name: t, azimuth: wrapDegrees(Number(rim[1])), altitude: 0 };
  const [az, alt] = parseDirection(t, 'zenith, rim@AZ, or AZ,ALT in degrees');
  return { name: `${az},${alt}`, azimuth: wrapDegrees(az), altitude: alt };
}

/** "markers.png", 3 → "markers-03.png". */
export function numberedPath(path: string, n: number, count: number): string {
  const ext = extname(path);
  const digits = Math.max(2, String(count).length);
  return `${path.slice(0, path.length - ext.length)}-${String(n).padStart(digits, '0')}${ext}`;
}

/**
 * True when text drawn at projector pixel (x, y) would read mirrored on the dome: the local map from
 * the projector frame (x right, y down) to the dome master (u right, v down, as seen from inside the
 * dome; docs/design.md, fisheye convention) reverses orientation — a negative Jacobian determinant,
 * as one reflection does. Where the light does not reach the dome, false.
 */
export function readsMirrored(tracer: Tracer, x: number, y: number): boolean {
  const at = (px: number, py: number) => {
    const h = tracer.pixel(px, py);
    return h.kind === 'dome' || h.kind === 'below-horizon' ? h.fisheye : null;
  };
  const c = at(x, y);
  const r = at(x + 1, y);
  const d = at(x, y + 1);
  if (!c || !r || !d) return false;
  return (r[0] - c[0]) * (d[1] - c[1]) - (r[1] - c[1]) * (d[0] - c[0]) < 0;
}

export function registerPattern(program: Command): void {
  const pattern = program
    .command('pattern')
    .description('draw alignment patterns: dome-master grids (optionally pre-warped) and projector-space marker frames')
    .addHelpText('after', '\nExamples:\n  skyfold pattern dome -o grid.png\n  skyfold pattern dome --warp rig.yaml -o grid-warped.png\n  skyfold pattern markers --rig rig.yaml --at zenith --at rim@0 --markers 960,300 -o markers.png');

  pattern
    .command('dome')
    .description('a dome-master pattern: altitude rings, azimuth spokes, zenith target, front/right/back/left marks, numbered dots')
    .requiredOption('-o, --output <file.png>', 'PNG file to write')
    .option('--size <pixels>', 'dome-master width and height', (s) => parsePositiveInt(s, 'a positive whole number of pixels'), DOME_PATTERN_DEFAULTS.size)
    .option('--fov <degrees>', "the dome master's field of view (default 180, or the rig's with --warp)", parseNumberIn(1, 360))
    .option('--rings <degrees>', 'altitude step between rings (0 = none)', parseNumberIn(0, 90), DOME_PATTERN_DEFAULTS.ringStep * RAD)
    .option('--spokes <degrees>', 'azimuth step between spokes (0 = none)', parseNumberIn(0, 180), Math.round(DOME_PATTERN_DEFAULTS.spokeStep * RAD))
    .option('--line-width <pixels>', 'line width (default: from the size)', parseNumberIn(0, 1000))
    .option('--dot <az,alt>', 'a numbered dot at this direction in degrees (repeatable)', collect(parseDot))
    .option('--no-zenith', 'leave out the zenith target')
    .option('--no-marks', 'leave out the front/right/back/left marks')
    .option('--no-ring-labels', 'leave out the altitude numbers')
    .option('--warp <rig>', 'write the pattern already warped for this rig (projector-sized)')
    .addOption(new Option('--filter <filter>', 'sampling filter for --warp').choices(['nearest', 'bilinear', 'area']).default(REMAP_DEFAULTS.filter))
    .option('--force', 'overwrite an existing file')
    .option('--json', 'print a JSON summary')
    .addHelpText('after', '\nExamples:\n  skyfold pattern dome -o grid.png --size 4096 --rings 15 --spokes 45\n  skyfold pattern dome -o dots.png --dot 0,30 --dot 90,30 --dot 180,30\n  skyfold pattern dome --warp rig.yaml -o grid-warped.png')
    .action(
      async (opts: {
        output: string;
        size: number;
        fov?: number;
        rings: number;
        spokes: number;
        lineWidth?: number;
        dot?: PatternDot[];
        zenith: boolean;
        marks: boolean;
        ringLabels: boolean;
        warp?: string;
        filter: RemapFilter;
        force?: boolean;
        json?: boolean;
      }) => {
        checkPngPath(opts.output);
        const rig = opts.warp ? readRig(opts.warp) : undefined;
        const fovDeg = opts.fov ?? (rig ? rig.content.fov * RAD : 180);
        if (opts.size < 16) throw new UserError(`--size: expected at least 16 pixels, got ${opts.size}`);
        const master = drawDomePattern({
          size: opts.size,
          fov: fovDeg * DEG,
          ringStep: opts.rings * DEG,
          spokeStep: opts.spokes * DEG,
          lineWidth: opts.lineWidth ?? 0,
          zenithTarget: opts.zenith,
          directionMarks: opts.marks,
          ringLabels: opts.ringLabels,
          dots: opts.dot ?? [],
        });
        let img: ImageBuffer = master;
        if (rig) {
          if (Math.abs(fovDeg * DEG - rig.content.fov) > 1e-9) warn(`--fov ${fovDeg} differs from ${opts.warp}'s content.fov ${fixed(rig.content.fov * RAD, 3)}: the warp maps the rig's fov`);
          const map = pixelMapFromRig(rig, [master.width, master.height], { brightness: 0 });
          img = remap(master, map, { filter: opts.filter });
        }
        await writePng(opts.output, img, opts.force);
        if (opts.json) printJson({ file: opts.output, width: img.width, height: img.height, warped: Boolean(rig), fov: fovDeg });
        else writeOut(`wrote ${opts.output} (${img.width} × ${img.height}${rig ? `, warped for ${opts.warp}` : ', dome master'})\n`);
      },
    );

  const given: ('pixel' | 'at')[] = [];
  pattern
    .command('markers')
    .description('numbered crosshairs at projector pixels, for noting where each lands on the dome (observations for `skyfold fit`)')
    .requiredOption('-o, --output <file.png>', 'PNG file to write (with --each, numbered files beside it)')
    .option('--rig <rig>', "rig file: the frame's resolution, and where --at directions land")
    .option('--resolution <WxH>', 'frame size in pixels when no rig is given', parseResolution)
    .option('--markers <x,y...>', 'crosshairs at these projector pixel coordinates (pixel centres at +0.5)', (s: string, prev: [number, number][] | undefined) => [
      ...(prev ?? []),
      parseNumberPair(s, 'X,Y (two numbers)'),
    ])
    .option('--at <target>', 'a crosshair where the rig says this dome point lands: zenith, rim@AZ or AZ,ALT (repeatable; needs --rig)', collect(parseTarget))
    .option('--each', 'one frame per marker instead of all in one')
    .option('--force', 'overwrite existing files')
    .option('--json', 'print a JSON summary')
    .on('option:markers', () => given.push('pixel'))
    .on('option:at', () => given.push('at'))
    .addHelpText('after', '\nExamples:\n  skyfold pattern markers --rig rig.yaml --markers 960,300 1400,500 -o markers.png\n  skyfold pattern markers --rig rig.yaml --at zenith --at rim@0 --at rim@90 --each -o marker.png')
    .action(
      async (opts: {
        output: string;
        rig?: string;
        resolution?: [number, number];
        markers?: [number, number][];
        at?: Target[];
        each?: boolean;
        force?: boolean;
        json?: boolean;
      }) => {
        checkPngPath(opts.output);
        const rig = opts.rig ? readRig(opts.rig) : undefined;
        const size = opts.resolution ?? rig?.projector.resolution;
        if (!size) throw new UserError('pattern markers: expected --rig or --resolution to know the frame size, got neither');
        const [W, H] = size;
        if (opts.at && !rig) throw new UserError('pattern markers: --at needs --rig to know where the dome points land');
        const tracer = rig ? new Tracer(rig) : undefined;
        type Entry = { marker: Marker; source: string; predicted?: { azimuth: number; altitude: number } | null };
        const entries: Entry[] = [];
        const pixels = [...(opts.markers ?? [])];
        const targets = [...(opts.at ?? [])];
        // numbered in the order given on the command line, --markers and --at interleaved as written
        for (const kind of given) {
          if (kind === 'pixel') {
            const [x, y] = pixels.shift()!;
            if (!(x >= 0 && x <= W && y >= 0 && y <= H)) throw new UserError(`--markers: expected a pixel inside the ${W} × ${H} frame, got ${x},${y}`);
            entries.push({ marker: { x, y }, source: 'pixel' });
          } else {
            const t = targets.shift()!;
            const r = locateDirection(tracer!, t.azimuth * DEG, t.altitude * DEG);
            if (!r.pixel) throw new UserError(`--at ${t.name}: the rig ${opts.rig} lights no pixel there (${r.reason})`);
            entries.push({ marker: { x: Number(r.pixel[0].toFixed(1)), y: Number(r.pixel[1].toFixed(1)) }, source: t.name });
          }
        }
        if (entries.length === 0) throw new UserError('pattern markers: expected at least one --markers X,Y or --at TARGET, got none');
        entries.forEach((e, k) => {
          e.marker.label = String(k + 1);
          if (tracer) {
            const h = tracer.pixel(e.marker.x, e.marker.y);
            e.predicted = h.kind === 'mirror-miss' || h.kind === 'open' ? null : { azimuth: wrapDegrees(h.azimuth * RAD), altitude: h.altitude * RAD };
            e.marker.mirrored = readsMirrored(tracer, e.marker.x, e.marker.y);
          }
        });
        const files: string[] = [];
        if (opts.each) {
          for (const [k, e] of entries.entries()) {
            const path = numberedPath(opts.output, k + 1, entries.length);
            await writePng(path, drawMarkerFrame(W, H, [e.marker]), opts.force);
            files.push(path);
          }
        } else {
          await writePng(opts.output, drawMarkerFrame(W, H, entries.map((e) => e.marker)), opts.force);
          files.push(opts.output);
        }
        if (opts.json) {
          printJson({
            files,
            width: W,
            height: H,
            markers: entries.map((e, k) => ({ number: k + 1, pixel: [e.marker.x, e.marker.y], from: e.source, predicted: e.predicted ?? null, ...(tracer ? { labelMirrored: e.marker.mirrored ?? false } : {}) })),
          });
          return;
        }
        const lines = [`wrote ${files.join(', ')} (${W} × ${H}, ${entries.length} marker${entries.length === 1 ? '' : 's'})`, ''];
        lines.push('# observations for a measurement file: replace each azimuth and altitude with where the marker');
        lines.push('# was seen on the dome (or write `at: zenith` / `at: rim@AZ`); the values given are the rig\'s prediction');
        lines.push('observations:');
        entries.forEach((e, k) => {
          const p = e.predicted;
          const where = p ? `azimuth: ${fixed(p.azimuth, 1)}, altitude: ${fixed(p.altitude, 1)}` : 'azimuth: 0, altitude: 0';
          const note = e.source === 'pixel' ? '' : ` (placed for ${e.source})`;
          lines.push(`  - {pixel: [${e.marker.x}, ${e.marker.y}], ${where}}   # marker ${k + 1}${note}${p === null ? ' - misses the mirror in this rig' : ''}`);
        });
        writeOut(lines.join('\n') + '\n');
      },
    );
}
