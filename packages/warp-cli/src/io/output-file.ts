/** Writing the files skyfold makes: whole or not at all (a temporary file beside the target, then a rename). */
import { existsSync, mkdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { UserError } from '../errors.js';

/**
 * Writes bytes atomically: readers see the old file or the new one, never half of it. The folder is
 * made if missing; `temp` (beside the target, same file system) defaults to a hidden name of this process.
 */
export function writeFileAtomic(path: string, bytes: Uint8Array | string, temp = join(dirname(path), `.${basename(path)}.${process.pid}.partial`)): void {
  mkdirSync(dirname(path), { recursive: true });
  try {
    writeFileSync(temp, bytes);
    renameSync(temp, path);
  } catch (e) {
    rmSync(temp, { force: true });
    throw e;
  }
}

/** Refuses to replace an existing file unless the user passed --force. */
export function refuseToOverwrite(path: string, force: boolean | undefined, why = ''): void {
  if (!force && existsSync(path)) throw new UserError(`${path}: already exists${why}; pass --force to overwrite it`);
}

/** A command's output file, written atomically; a failure is one line naming the file. */
export function writeOutputFile(path: string, bytes: Uint8Array | string): void {
  try {
    writeFileAtomic(path, bytes);
  } catch (e) {
    throw new UserError(`${path}: cannot write: ${(e as Error).message}`);
  }
}
