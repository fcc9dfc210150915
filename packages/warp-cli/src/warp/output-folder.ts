/**
 * The output folder of a frame batch: made if missing, never an input folder under any name, and
 * cleared of the temporary files a killed run left behind.
 */
import { randomBytes } from 'node:crypto';
import { mkdirSync, readdirSync, realpathSync, rmSync, statSync } from 'node:fs';
import { hostname } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { UserError } from '../errors.js';
import type { Frame } from './inputs.js';

const PARTIAL_TAG = '.skyfold-partial-';

/** This machine's name as it appears in temporary file names. */
export function hostTag(): string {
  return hostname().replace(/[^A-Za-z0-9]/g, '');
}

/**
 * The part of a temporary file name that says which machine and process writes it, then random letters:
 * a name nobody can predict and plant a link at (temporaries are also created exclusively).
 */
export function partialTag(host: string): string {
  return `${PARTIAL_TAG}${host}-${process.pid}-${randomBytes(6).toString('hex')}-`;
}

/**
 * Creates `output` if needed and returns its absolute path; refuses a file, and refuses the folder
 * of any input (`all`: every frame named, before --frames and --shard) as `output` names it.
 */
export function prepareOutputFolder(output: string, all: Frame[]): string {
  const outDir = resolve(output);
  try {
    mkdirSync(outDir, { recursive: true });
  } catch (e) {
    throw new UserError(`${output}: cannot create the output folder: ${(e as Error).message}`);
  }
  const outStat = statSync(outDir);
  if (!outStat.isDirectory()) throw new UserError(`${output}: is not a folder`);
  // the same folder under any name (a symlink, a relative path) is refused: compare device and inode of
  // the folder each input is named in and of the folder its file really lives in (a link's target)
  const checked = new Set<string>();
  for (const f of all) {
    let real: string | undefined;
    try {
      real = realpathSync(f.path);
    } catch {
      // unreadable: reported when its turn comes
    }
    const named = dirname(resolve(f.path));
    for (const d of real ? [named, dirname(real)] : [named]) {
      if (checked.has(d)) continue;
      checked.add(d);
      const st = statSync(d);
      if (st.dev === outStat.dev && st.ino === outStat.ino) {
        const via = real && d === dirname(real) && d !== named ? ` (it links to ${real})` : '';
        throw new UserError(`${output}: is the folder of the input ${f.path}${via}; write the warped frames to another folder`);
      }
    }
  }
  return outDir;
}

/** Removes temporary files a killed run of this machine left behind (their process is gone). */
export function removeStalePartials(outDir: string, host: string): void {
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

/** Removes this run's own temporary files (frames stopped before they were finished). */
export function removeOwnPartials(outDir: string, tag: string): void {
  try {
    for (const n of readdirSync(outDir)) if (n.includes(tag)) rmSync(join(outDir, n), { force: true });
  } catch {
    // folder gone: nothing to clean
  }
}
