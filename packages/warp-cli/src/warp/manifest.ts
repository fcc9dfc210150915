/**
 * The run log of an output folder: one JSON line per finished frame, appended (appends of a short
 * line are atomic, so shards on several machines may share a folder). A rerun skips a frame whose
 * output exists and whose latest line matches its input (path, size, modification time) and settings.
 */
import { closeSync, constants, lstatSync, openSync, readFileSync, statSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { UserError } from '../errors.js';

export const MANIFEST_NAME = '.skyfold-warp.jsonl';

export interface ManifestEntry {
  output: string;
  input: string;
  size: number;
  mtimeMs: number;
  settings: string;
}

export class Manifest {
  readonly path: string;
  private entries = new Map<string, ManifestEntry>();

  constructor(outDir: string) {
    this.path = join(outDir, MANIFEST_NAME);
    let link = false;
    try {
      link = lstatSync(this.path).isSymbolicLink();
    } catch {
      // no run log yet
    }
    if (link) throw new UserError(`${this.path}: the run log is a symbolic link; skyfold does not write through links (remove it)`);
    let text = '';
    try {
      text = readFileSync(this.path, 'utf8');
    } catch {
      return;
    }
    for (const line of text.split('\n')) {
      if (!line.trim()) continue;
      try {
        const e = JSON.parse(line) as ManifestEntry;
        if (typeof e.output === 'string') this.entries.set(e.output, e);
      } catch {
        // a line cut short by a killed run: ignore it, that frame is redone
      }
    }
  }

  /** True when `output` was finished from this very input with these settings. */
  isDone(output: string, input: string, settings: string): boolean {
    const e = this.entries.get(output);
    if (!e || e.settings !== settings || e.input !== input) return false;
    try {
      const st = statSync(input);
      statSync(join(this.path, '..', output));
      return st.size === e.size && st.mtimeMs === e.mtimeMs;
    } catch {
      return false;
    }
  }

  record(output: string, input: string, settings: string): void {
    const st = statSync(input);
    const e: ManifestEntry = { output, input, size: st.size, mtimeMs: st.mtimeMs, settings };
    this.entries.set(output, e);
    // O_NOFOLLOW: a link put there during the run is not written through
    const fd = openSync(this.path, constants.O_WRONLY | constants.O_APPEND | constants.O_CREAT | constants.O_NOFOLLOW, 0o644);
    try {
      writeSync(fd, JSON.stringify(e) + '\n');
    } finally {
      closeSync(fd);
    }
  }
}
