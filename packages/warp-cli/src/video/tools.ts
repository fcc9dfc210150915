/**
 * Finding ffmpeg and ffprobe, the two programs skyfold runs for video: `--ffmpeg PATH`, else
 * `SKYFOLD_FFMPEG`, else the PATH. ffprobe is looked for beside the ffmpeg that was chosen.
 */
import { accessSync, constants, statSync } from 'node:fs';
import { basename, delimiter, dirname, join } from 'node:path';
import { UserError } from '../errors.js';
import { runContext } from '../io/run-context.js';

export interface VideoTools {
  ffmpeg: string;
  ffprobe: string;
}

const INSTALL_HINT = 'install ffmpeg (apt-get install ffmpeg, brew install ffmpeg, or https://ffmpeg.org/download.html), or give its path with --ffmpeg PATH or SKYFOLD_FFMPEG';

function isExecutable(path: string): boolean {
  try {
    accessSync(path, constants.X_OK);
    return statSync(path).isFile();
  } catch {
    return false;
  }
}

function onPath(name: string, pathVar: string | undefined): string | undefined {
  const exts = process.platform === 'win32' ? ['.exe', ''] : [''];
  for (const dir of (pathVar ?? '').split(delimiter)) {
    if (!dir) continue;
    for (const ext of exts) if (isExecutable(join(dir, name + ext))) return join(dir, name + ext);
  }
  return undefined;
}

/** ffprobe beside a given ffmpeg: the same folder, the same name with "ffmpeg" turned into "ffprobe". */
function probeBeside(ffmpeg: string): string | undefined {
  const name = basename(ffmpeg);
  const guess = join(dirname(ffmpeg), name.includes('ffmpeg') ? name.replace('ffmpeg', 'ffprobe') : 'ffprobe');
  return isExecutable(guess) ? guess : undefined;
}

/**
 * The ffmpeg and ffprobe to run. `given` is --ffmpeg's value (a program or the folder holding it);
 * a missing program is a UserError (exit 2) saying how to install it.
 */
export function findVideoTools(given: string | undefined, env: Record<string, string | undefined> = runContext().env): VideoTools {
  const explicit = given ?? (env.SKYFOLD_FFMPEG || undefined);
  const what = given !== undefined ? '--ffmpeg' : 'SKYFOLD_FFMPEG';
  if (explicit !== undefined) {
    let ffmpeg = explicit;
    try {
      if (statSync(explicit).isDirectory()) ffmpeg = join(explicit, process.platform === 'win32' ? 'ffmpeg.exe' : 'ffmpeg');
    } catch {
      // not there: reported below
    }
    if (!isExecutable(ffmpeg)) throw new UserError(`${what} ${explicit}: no ffmpeg program there; ${INSTALL_HINT}`);
    const ffprobe = probeBeside(ffmpeg);
    if (!ffprobe) throw new UserError(`${what} ${explicit}: no ffprobe beside it in ${dirname(ffmpeg)}; ${INSTALL_HINT}`);
    return { ffmpeg, ffprobe };
  }
  const ffmpeg = onPath('ffmpeg', env.PATH);
  const ffprobe = ffmpeg ? (probeBeside(ffmpeg) ?? onPath('ffprobe', env.PATH)) : undefined;
  if (!ffmpeg || !ffprobe) throw new UserError(`video needs ${ffmpeg ? 'ffprobe' : 'ffmpeg'}, which is not on the PATH: ${INSTALL_HINT}`);
  return { ffmpeg, ffprobe };
}

/** The tools when present, else undefined (to recognise a video by probing only when one can probe). */
export function tryVideoTools(given: string | undefined, env: Record<string, string | undefined> = runContext().env): VideoTools | undefined {
  try {
    return findVideoTools(given, env);
  } catch {
    return undefined;
  }
}
