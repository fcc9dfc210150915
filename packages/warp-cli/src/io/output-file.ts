/** Writing the files skyfold makes: whole or not at all (a temporary file beside the target, then a rename). */
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { basename, dirname, join } from 'node:path';
import { UserError } from '../errors.js';

const HOST = hostname().replace(/[^A-Za-z0-9]/g, '') || 'host';

/**
 * The temporary name beside `path`: hidden, naming this machine and process (so a later run can tell a
 * dead run's leftovers), with random letters so nobody can plant a link there in advance.
 */
export function tempPathFor(path: string): string {
  return join(dirname(path), `.${basename(path)}.${HOST}.${process.pid}.${randomBytes(6).toString('hex')}.partial`);
}

function processAlive(pid: number): boolean {
  if (pid === process.pid) return true;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * Removes the temporaries a killed run of this machine left beside `path` (theirs only: same target name,
 * this host or the older host-less names, a process that is gone).
 */
export function removeStaleTemps(path: string): void {
  const base = basename(path);
  const prefix = `.${base}.`;
  let names: string[];
  try {
    names = readdirSync(dirname(path));
  } catch {
    return;
  }
  for (const n of names) {
    if (!n.startsWith(prefix) || !n.endsWith('.partial')) continue;
    const parts = n.slice(prefix.length, -'.partial'.length).split('.');
    // [host, pid, random] now; [pid] before hosts and random letters were in the name
    const [host, pid] = parts.length === 3 ? [parts[0], parts[1]] : parts.length === 1 ? [HOST, parts[0]] : [undefined, undefined];
    if (host !== HOST || !/^\d+$/.test(pid ?? '')) continue;
    if (!processAlive(Number(pid))) rmSync(join(dirname(path), n), { force: true });
  }
}

/**
 * Writes bytes atomically: readers see the old file or the new one, never half of it. The folder is
 * made if missing; `temp` (beside the target, same file system) defaults to {@link tempPathFor}. The
 * temporary is created exclusively (O_EXCL: a link planted there is not followed), and the rename
 * replaces a link at `path` itself rather than writing through it.
 */
export function writeFileAtomic(path: string, bytes: Uint8Array | string, temp?: string): void {
  mkdirSync(dirname(path), { recursive: true });
  const t = temp ?? tempPathFor(path);
  if (temp === undefined) removeStaleTemps(path);
  try {
    writeFileSync(t, bytes, { flag: 'wx' });
    renameSync(t, path);
  } catch (e) {
    // EEXIST: the name was taken (perhaps a planted link), so it is not ours to remove; else it is ours,
    // perhaps half written (a full disk)
    if ((e as NodeJS.ErrnoException).code !== 'EEXIST') rmSync(t, { force: true });
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
