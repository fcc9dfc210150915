/** `skyfold warp`: pre-warps dome-master frames for the rig — files, folders, sequences, or a raw video pipe. */
import { Option, type Command } from 'commander';
import { BAKE_DEFAULTS, MAX_PROJECTOR_SIDE, REMAP_DEFAULTS, type RemapFilter } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { asOptionParser, parseAngle, parseNumberIn, parsePositiveInt, parseSize } from '../options.js';
import { DEFAULT_MAX_PIXELS, FRAME_FORMATS, type FrameFormat } from '../io/image-codec.js';
import { warpFrames } from '../warp/batch.js';
import { parseFrameRange, parseShard } from '../warp/inputs.js';
import { loadMapSource, type MapSettings } from '../warp/map-source.js';
import { runRawPipe, parseRawSpec } from '../warp/raw-pipe.js';
import { recogniseVideo } from '../video/recognise.js';
import { runVideoWarp } from '../video/command.js';
import { VIDEO_CODECS, type VideoCodec } from '../video/encode.js';
import { DEFAULT_SEGMENT_SECONDS } from '../video/segments.js';

interface WarpOptions {
  output?: string;
  format?: FrameFormat;
  quality?: number;
  compression?: string;
  filter: RemapFilter;
  brightness: number;
  brightnessFloor: number;
  feather: number;
  frames?: [number, number];
  shard?: [number, number];
  segment?: number;
  jobs?: number;
  flip?: boolean;
  nonSquare?: boolean;
  rotate: number;
  overwrite?: boolean;
  maxPixels: number;
  rawIn?: string;
  ffmpeg?: string;
  codec?: VideoCodec;
  crf?: number;
  preset?: string;
  json?: boolean;
  projectorSize?: [number, number];
}

export function registerWarp(program: Command): void {
  program
    .command('warp')
    .description('pre-warp dome-master frames (files, folders, numbered sequences) for the rig, in parallel and resumable')
    .argument('<rig-or-mesh>', 'rig file (exact per-pixel trace) or baked mesh (.glb .obj .pfm .mpcdi .png .csv)')
    .argument('[inputs...]', 'image files, folders (natural order) or sequences such as show/frame_%05d.png')
    .option('-o, --output <dir>', 'output folder (never an input folder); for a video input, the output video file')
    .addOption(new Option('--format <format>', "output format (default: each input's own)").choices([...FRAME_FORMATS]))
    .option('--quality <q>', 'JPEG/WebP quality 1-100', parseNumberIn(1, 100))
    .addOption(new Option('--compression <level>', 'PNG zlib level: 1 encodes fastest, 9 smallest (default 6)').choices(['0', '1', '2', '3', '4', '5', '6', '7', '8', '9']))
    .addOption(new Option('--filter <filter>', 'sampling filter').choices(['nearest', 'bilinear', 'area']).default(REMAP_DEFAULTS.filter))
    .option('--brightness <s>', 'brightness compensation strength 0-1', parseNumberIn(0, 1), BAKE_DEFAULTS.brightness)
    .option('--brightness-floor <f>', 'lowest brightness factor', parseNumberIn(0, 1), BAKE_DEFAULTS.brightnessFloor)
    .option('--feather <deg>', 'soft edge width in degrees', parseNumberIn(0, 90), BAKE_DEFAULTS.feather)
    .option('--frames <a-b>', 'only frames numbered A to B (the number in the file name, else the position from 1)', asOptionParser('--frames', parseFrameRange))
    .option('--shard <k/n>', 'only frame K of every N (K from 1), to split a show across machines; for a video, the K-th of N blocks of its segments, joined by a later plain run', asOptionParser('--shard', parseShard))
    .option('--segment <seconds>', `a warped video is made in segments of this length, each kept once finished (default ${DEFAULT_SEGMENT_SECONDS})`, parseNumberIn(0.001, 86_400))
    .option('--jobs <n>', 'worker threads (default: the core count)', (s) => parsePositiveInt(s))
    .option('--flip', 'the content arrives mirrored left-right')
    .option('--non-square', 'warp frames that are not square (a dome master is): u across the width, v down the height')
    .option('--rotate <deg>', 'the content arrives turned: degrees clockwise to turn it back, any angle (-30 turns it back counter-clockwise)', parseAngle, 0)
    .option('--overwrite', 'redo frames even when the run log says they are done')
    .option('--max-pixels <n>', 'refuse frames larger than this many pixels', (s) => parsePositiveInt(s), DEFAULT_MAX_PIXELS)
    .option('--raw-in <WxH[:fmt]>', 'read raw frames (rgb24 or rgb48le) from standard input and write raw warped frames to standard output')
    .addOption(new Option('--codec <codec>', 'codec of a warped video (default: h264 for .mp4 .mkv .avi, prores 422 HQ for .mov, vp9 for .webm)').choices([...VIDEO_CODECS]))
    .option('--crf <n>', 'quality of a warped h264, hevc or vp9 video, lower is better (default 18; vp9 24)', parseNumberIn(0, 63))
    .option('--preset <name>', 'x264/x265 speed preset of a warped video (default medium)')
    .option('--ffmpeg <path>', 'the ffmpeg program to run for video (ffprobe beside it); default SKYFOLD_FFMPEG, else the PATH')
    .option('--projector-size <WxH>', 'the projector resolution a .pfm or .png mesh spans (those files do not say it)', parseSize({ min: 1, what: 'WxH, the projector resolution in pixels (e.g. 1920x1200)', max: { value: MAX_PROJECTOR_SIDE, why: 'the largest projector side skyfold reads' } }))
    .option('--json', 'print a JSON summary')
    .addHelpText(
      'after',
      '\nExamples:\n  skyfold warp rig.yaml show/ -o warped/\n  skyfold warp rig.yaml show.mp4 -o warped.mp4\n  skyfold warp mesh.glb "show/frame_%05d.png" -o warped/ --frames 1-500 --jobs 4\n' +
        '  skyfold warp mesh.pfm show/ -o warped/ --projector-size 1920x1200\n' +
        '  skyfold warp rig.yaml show/ -o /shared/warped --shard 3/8\n' +
        '  skyfold warp rig.yaml show.mp4 -o /shared/warped.mp4 --shard 3/8   (then once: skyfold warp rig.yaml show.mp4 -o /shared/warped.mp4)\n' +
        '  ffmpeg -i show.mp4 -f rawvideo -pix_fmt rgb24 - | skyfold warp rig.yaml --raw-in 4096x4096 | ffmpeg -f rawvideo -pix_fmt rgb24 -s 1920x1200 -r 30 -i - out.mp4',
    )
    .action(async (source: string, inputs: string[], opts: WarpOptions, cmd: Command) => {
      const map = await loadMapSource(source, undefined, { projectorSize: opts.projectorSize });
      if (map.kind === 'rig' && opts.projectorSize) throw new UserError('--projector-size: only for a .pfm or .png mesh; a rig gives its own projector.resolution');
      const rotate = ((opts.rotate % 360) + 360) % 360;
      const mapSettings: MapSettings = { brightness: opts.brightness, brightnessFloor: opts.brightnessFloor, feather: opts.feather, flip: opts.flip, rotate, ...(opts.nonSquare ? { nonSquare: true } : {}) };
      if (map.kind === 'mesh') {
        for (const o of ['brightnessFloor', 'feather'] as const) {
          if (cmd.getOptionValueSource(o) === 'cli') throw new UserError(`--${o === 'brightnessFloor' ? 'brightness-floor' : o}: a baked mesh carries its own; re-bake it, or warp from the rig`);
        }
        if (cmd.getOptionValueSource('brightness') === 'cli' && opts.brightness !== 0 && opts.brightness !== 1) {
          throw new UserError('--brightness: a baked mesh carries its own brightness (use 0 to turn it off, or re-bake with another strength)');
        }
      }
      if (opts.rawIn) {
        if (inputs.length > 0) throw new UserError('--raw-in reads frames from standard input: give no input files');
        const spec = parseRawSpec(opts.rawIn, opts.maxPixels);
        await runRawPipe(map, mapSettings, spec, opts.filter);
        return;
      }
      const video = await recogniseVideo(inputs, opts.ffmpeg);
      if (video) {
        for (const o of ['frames', 'format', 'quality', 'compression'] as const) if (opts[o] !== undefined) throw new UserError(`--${o}: not for a video input (it is warped whole, to a video file)`);
        await runVideoWarp(video, map, mapSettings, {
          output: opts.output,
          filter: opts.filter,
          json: opts.json,
          codec: opts.codec,
          crf: opts.crf,
          preset: opts.preset,
          shard: opts.shard,
          segmentSeconds: opts.segment,
          overwrite: opts.overwrite,
        });
        return;
      }
      for (const o of ['codec', 'crf', 'preset', 'segment'] as const) if (opts[o] !== undefined) throw new UserError(`--${o}: only for a video input`);
      if (inputs.length === 0) throw new UserError('warp: give input frames (files, folders or a sequence pattern), or --raw-in');
      if (!opts.output) throw new UserError('warp: give an output folder with -o');
      const compression = opts.compression === undefined ? undefined : Number(opts.compression);
      await warpFrames(map, mapSettings, inputs, { ...opts, output: opts.output, compression });
    });
}
