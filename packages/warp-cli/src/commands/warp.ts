/** `skyfold warp`: pre-warps dome-master frames for the rig — files, folders, sequences, or a raw video pipe. */
import { createHash } from 'node:crypto';
import { mkdirSync, readdirSync, rmSync, statSync } from 'node:fs';
import { availableParallelism, hostname } from 'node:os';
import { basename, dirname, join, resolve } from 'node:path';
import { InvalidArgumentError, Option, type Command } from 'commander';
import { BAKE_DEFAULTS, REMAP_DEFAULTS, type RemapFilter, type RemapMap } from '@skyfold/warp-core';
import { UserError } from '../errors.js';
import { printJson } from '../format.js';
import { info } from '../messages.js';
import { asOptionParser, parseNumberIn, parsePositiveInt } from '../options.js';
import { VERSION } from '../version.js';
import { DEFAULT_MAX_PIXELS, FRAME_EXTENSION, FRAME_FORMATS, formatOfPath, readImageSize, type FrameFormat } from '../io/image-codec.js';
import { expandInputs, parseFrameRange, parseShard, selectFrames, type Frame } from '../warp/inputs.js';
import { runFrameJob, type FrameJob, type FrameOutcome, type WarpSettings } from '../warp/job.js';
import { Manifest } from '../warp/manifest.js';
import { loadMapSource, type MapSettings, type MapSource } from '../warp/map-source.js';
import { FramePool } from '../warp/pool.js';
import { Progress } from '../warp/progress.js';
import { runRawPipe, parseRawSpec } from '../warp/raw-pipe.js';
import { runContext, setExitCode, writeErr } from '../io/run-context.js';

interface WarpOptions {
  output?: string;
  format?: FrameFormat;
  quality?: number;
  filter: RemapFilter;
  brightness: number;
  brightnessFloor: number;
  feather: number;
  frames?: [number, number];
  shard?: [number, number];
  jobs?: number;
  flip?: boolean;
  rotate: string;
  overwrite?: boolean;
  maxPixels: number;
  rawIn?: string;
  json?: boolean;
}

const PARTIAL_TAG = '.skyfold-partial-';

/** Removes temporary files a killed run of this machine left behind (their process is gone). */
function removeStalePartials(outDir: string, host: string): void {
  let names: string[];
  try {
    names = readdirSync(outDir);
  } catch {
    return;
  }
  for (const n of names) {
    const i = n.indexOf(PARTIAL_TAG);
    if (i < 0) continue;
    const [h, pid] = n.slice(i + PARTIAL_TAG.length).split('-');
    if (h !== host) continue;
    let alive = false;
    try {
      process.kill(Number(pid), 0);
      alive = Number(pid) !== process.pid ? true : false;
    } catch {
      alive = false;
    }
    if (!alive) rmSync(join(outDir, n), { force: true });
  }
}

function removeOwnPartials(outDir: string, tag: string): void {
  try {
    for (const n of readdirSync(outDir)) if (n.includes(tag)) rmSync(join(outDir, n), { force: true });
  } catch {
    // folder gone: nothing to clean
  }
}

export function registerWarp(program: Command): void {
  program
    .command('warp')
    .description('pre-warp dome-master frames (files, folders, numbered sequences) for the rig, in parallel and resumable')
    .argument('<rig-or-mesh>', 'rig file (exact per-pixel trace) or baked mesh (.glb)')
    .argument('[inputs...]', 'image files, folders (natural order) or sequences such as show/frame_%05d.png')
    .option('-o, --output <dir>', 'output folder (never an input folder)')
    .addOption(new Option('--format <format>', "output format (default: each input's own)").choices([...FRAME_FORMATS]))
    .option('--quality <q>', 'JPEG/WebP quality 1-100', parseNumberIn(1, 100))
    .addOption(new Option('--filter <filter>', 'sampling filter').choices(['nearest', 'bilinear', 'area']).default(REMAP_DEFAULTS.filter))
    .option('--brightness <s>', 'brightness compensation strength 0-1', parseNumberIn(0, 1), BAKE_DEFAULTS.brightness)
    .option('--brightness-floor <f>', 'lowest brightness factor', parseNumberIn(0, 1), BAKE_DEFAULTS.brightnessFloor)
    .option('--feather <deg>', 'soft edge width in degrees', parseNumberIn(0, 90), BAKE_DEFAULTS.feather)
    .option('--frames <a-b>', 'only frames numbered A to B (the number in the file name, else the position from 1)', asOptionParser('--frames', parseFrameRange))
    .option('--shard <k/n>', 'only frame K of every N (K from 1), to split a show across machines', asOptionParser('--shard', parseShard))
    .option('--jobs <n>', 'worker threads (default: the core count)', (s) => parsePositiveInt(s))
    .option('--flip', 'the content arrives mirrored left-right')
    .addOption(new Option('--rotate <deg>', 'the content arrives turned: degrees clockwise to turn it back').choices(['0', '90', '180', '270']).default('0'))
    .option('--overwrite', 'redo frames even when the run log says they are done')
    .option('--max-pixels <n>', 'refuse frames larger than this many pixels', (s) => parsePositiveInt(s), DEFAULT_MAX_PIXELS)
    .option('--raw-in <WxH[:fmt]>', 'read raw frames (rgb24 or rgb48le) from standard input and write raw warped frames to standard output')
    .option('--json', 'print a JSON summary')
    .addHelpText(
      'after',
      '\nExamples:\n  skyfold warp rig.yaml show/ -o warped/\n  skyfold warp mesh.glb "show/frame_%05d.png" -o warped/ --frames 1-500 --jobs 4\n' +
        '  skyfold warp rig.yaml show/ -o /shared/warped --shard 3/8\n' +
        '  ffmpeg -i show.mp4 -f rawvideo -pix_fmt rgb24 - | skyfold warp rig.yaml --raw-in 4096x4096 | ffmpeg -f rawvideo -pix_fmt rgb24 -s 1920x1200 -r 30 -i - out.mp4',
    )
    .action(async (source: string, inputs: string[], opts: WarpOptions, cmd: Command) => {
      const map = await loadMapSource(source);
      const rotate = Number(opts.rotate) as 0 | 90 | 180 | 270;
      const mapSettings: MapSettings = { brightness: opts.brightness, brightnessFloor: opts.brightnessFloor, feather: opts.feather, flip: opts.flip, rotate };
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
      if (inputs.length === 0) throw new UserError('warp: give input frames (files, folders or a sequence pattern), or --raw-in');
      if (!opts.output) throw new UserError('warp: give an output folder with -o');
      await warpFrames(map, mapSettings, inputs, opts);
    });
}

async function warpFrames(map: MapSource, mapSettings: MapSettings, inputs: string[], opts: WarpOptions): Promise<void> {
  const t0 = performance.now();
  const all = expandInputs(inputs);
  const frames = selectFrames(all, opts.frames, opts.shard);
  const outDir = resolve(opts.output!);
  try {
    mkdirSync(outDir, { recursive: true });
  } catch (e) {
    throw new UserError(`${opts.output}: cannot create the output folder: ${(e as Error).message}`);
  }
  const outStat = statSync(outDir);
  if (!outStat.isDirectory()) throw new UserError(`${opts.output}: is not a folder`);
  // the same folder under any name (a symlink, a relative path) is refused: compare device and inode
  const inputDirs = new Map<string, string>();
  for (const f of all) if (!inputDirs.has(dirname(resolve(f.path)))) inputDirs.set(dirname(resolve(f.path)), f.path);
  for (const [d, example] of inputDirs) {
    const st = statSync(d);
    if (st.dev === outStat.dev && st.ino === outStat.ino) {
      throw new UserError(`${opts.output}: is the folder of the input ${example}; write the warped frames to another folder`);
    }
  }
  const host = hostname().replace(/[^A-Za-z0-9]/g, '');
  removeStalePartials(outDir, host);

  const settingsKey = createHash('sha256')
    .update(JSON.stringify({ v: VERSION, map: map.key, filter: opts.filter, ...mapSettings, format: opts.format ?? null, quality: opts.quality ?? null }))
    .digest('hex')
    .slice(0, 32);
  const manifest = new Manifest(outDir);
  const tag = `${PARTIAL_TAG}${host}-${process.pid}-`;
  const jobs: (FrameJob & { frame: Frame })[] = [];
  let skipped = 0;
  for (const frame of frames) {
    const format = opts.format ?? formatOfPath(frame.path) ?? 'png';
    const outName = frame.name + FRAME_EXTENSION[format];
    const input = resolve(frame.path);
    if (!opts.overwrite && manifest.isDone(outName, input, settingsKey)) {
      skipped++;
      continue;
    }
    jobs.push({ id: jobs.length, input, output: join(outDir, outName), temp: join(outDir, `.${outName}${tag}${jobs.length}`), format, frame });
  }

  const failures: { input: string; reason: string }[] = [];
  let done = 0;
  if (jobs.length > 0) {
    // the source size is the most common one among the frames' headers, so one odd frame at the
    // head of a show fails alone
    const sizes = new Map<string, number>();
    for (const j of jobs) {
      const wh = await readImageSize(j.input); // unreadable: reported when its turn comes
      if (wh) sizes.set(wh.join('x'), (sizes.get(wh.join('x')) ?? 0) + 1);
    }
    let size: [number, number] | undefined;
    let best = 0;
    for (const [key, count] of sizes) {
      if (count > best) {
        best = count;
        size = key.split('x').map(Number) as [number, number];
      }
    }
    const remapMap: RemapMap | undefined = size ? map.build(size, mapSettings) : undefined;
    const settings: WarpSettings = { filter: opts.filter, maxPixels: opts.maxPixels, sourceSize: size ?? [0, 0], encode: { quality: opts.quality } };
    const progress = new Progress(jobs.length, runContext().stderr, !opts.json);
    const finish = (job: (typeof jobs)[number], o: FrameOutcome) => {
      if (o.ok) {
        done++;
        manifest.record(basename(job.output), job.input, settingsKey);
      } else failures.push({ input: job.frame.path, reason: o.reason });
      progress.tick(job.frame.name, o.ok, o.ok ? '' : o.reason);
    };
    if (!remapMap) {
      for (const j of jobs) finish(j, { id: j.id, ok: false, reason: 'unreadable image: no size in its header' });
    } else {
      const threads = Math.max(1, Math.min(opts.jobs ?? availableParallelism(), jobs.length));
      // a signal stops the scheduling; frames in flight on workers are dropped, one on this thread finishes
      let stopping = false;
      let stop: () => void = () => {};
      const stopped = new Promise<void>((resolve) => (stop = resolve));
      const onSignal = () => {
        stopping = true;
        stop();
      };
      const pool = threads > 1 ? new FramePool(remapMap, settings, threads) : undefined;
      process.once('SIGINT', onSignal);
      process.once('SIGTERM', onSignal);
      try {
        if (pool) {
          let next = 0;
          const running = new Set<Promise<void>>();
          while ((next < jobs.length || running.size > 0) && !stopping) {
            while (next < jobs.length && pool.free > 0 && !stopping) {
              const job = jobs[next++];
              const p: Promise<void> = pool.run(job).then((o) => {
                running.delete(p);
                if (!stopping) finish(job, o);
              });
              running.add(p);
            }
            if (running.size > 0) await Promise.race([...running, stopped]);
          }
        } else {
          const scratch = {};
          for (const job of jobs) {
            if (stopping) break;
            finish(job, await runFrameJob(job, remapMap, settings, scratch));
          }
        }
      } finally {
        process.removeListener('SIGINT', onSignal);
        process.removeListener('SIGTERM', onSignal);
        await pool?.close();
        removeOwnPartials(outDir, tag);
      }
      if (stopping) {
        progress.finish();
        writeErr(`skyfold: stopped; ${done} frames finished this run. Run the same command again to finish the rest.\n`);
        setExitCode(130);
        return;
      }
    }
    progress.finish();
  }
  const seconds = (performance.now() - t0) / 1000;
  const summary = { done, skipped, failed: failures.length, failures, total: frames.length, output: opts.output, seconds };
  if (opts.json) printJson(summary);
  else {
    info(`${done} warped, ${skipped} already done, ${failures.length} failed of ${frames.length} frames in ${seconds.toFixed(1)} s -> ${opts.output}`);
    for (const f of failures) info(`  failed: ${f.input}: ${f.reason}`);
  }
  if (failures.length > 0) setExitCode(1);
}

export { InvalidArgumentError };
