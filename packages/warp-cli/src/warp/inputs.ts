/** Which frames a `warp` run covers: files, folders (natural sort) and numbered sequences. */
import { readdirSync, statSync } from 'node:fs';
import { basename, dirname, extname, join, resolve } from 'node:path';
import { UserError } from '../errors.js';

export const IMAGE_EXTENSIONS = ['.png', '.jpg', '.jpeg', '.tif', '.tiff', '.webp'];

export interface Frame {
  /** Path as it will be read. */
  path: string;
  /** Output base name (the input's, without extension). */
  name: string;
  /** Frame number: the sequence number, else the last number in the name, else the 1-based position. */
  number: number;
}

const collator = new Intl.Collator('en', { numeric: true, sensitivity: 'base' });

/** Natural order: "frame2" before "frame10". */
export function naturalCompare(a: string, b: string): number {
  return collator.compare(a, b) || (a < b ? -1 : a > b ? 1 : 0);
}

function isImage(name: string): boolean {
  return IMAGE_EXTENSIONS.includes(extname(name).toLowerCase());
}

function lastNumber(name: string): number | undefined {
  const m = /(\d+)(?!.*\d)/.exec(name);
  return m ? Number(m[1]) : undefined;
}

/** A printf-style sequence pattern such as `show/frame_%05d.png` → its files in number order. */
function expandSequence(pattern: string): Frame[] {
  const dir = dirname(pattern);
  const base = basename(pattern);
  const m = /%(0?)(\d*)d/.exec(base);
  if (!m) throw new UserError(`${pattern}: expected a sequence pattern with %d or %0Nd`);
  const before = base.slice(0, m.index);
  const after = base.slice(m.index + m[0].length);
  const width = m[2] ? Number(m[2]) : 0;
  const padded = m[1] === '0' && width > 0;
  const esc = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  const digits = padded ? `(\\d{${width},})` : '(\\d+)';
  const re = new RegExp(`^${esc(before)}${digits}${esc(after)}$`);
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch {
    throw new UserError(`${pattern}: cannot read the folder ${dir}`);
  }
  const frames: Frame[] = [];
  for (const n of names) {
    const mm = re.exec(n);
    if (!mm) continue;
    frames.push({ path: join(dir, n), name: n.slice(0, n.length - extname(n).length), number: Number(mm[1]) });
  }
  if (frames.length === 0) throw new UserError(`${pattern}: no files match this sequence`);
  frames.sort((a, b) => a.number - b.number);
  return frames;
}

/** Expands the INPUT arguments into an ordered, de-duplicated list of frames. */
export function expandInputs(inputs: string[]): Frame[] {
  const out: Frame[] = [];
  const seen = new Set<string>();
  const push = (f: Frame) => {
    const key = resolve(f.path);
    if (seen.has(key)) return;
    seen.add(key);
    out.push(f);
  };
  for (const input of inputs) {
    if (/%0?\d*d/.test(basename(input))) {
      expandSequence(input).forEach(push);
      continue;
    }
    let st;
    try {
      st = statSync(input);
    } catch {
      throw new UserError(`${input}: no such file or folder`);
    }
    if (st.isDirectory()) {
      const names = readdirSync(input).filter((n) => isImage(n) && !n.startsWith('.')).sort(naturalCompare);
      if (names.length === 0) throw new UserError(`${input}: the folder holds no images (${IMAGE_EXTENSIONS.join(' ')})`);
      for (const n of names) push({ path: join(input, n), name: n.slice(0, n.length - extname(n).length), number: NaN });
    } else {
      const n = basename(input);
      push({ path: input, name: n.slice(0, n.length - extname(n).length), number: NaN });
    }
  }
  // only regular files are frames: a FIFO would block the size pre-pass forever, a device read without end
  const odd: string[] = [];
  for (const f of out) {
    try {
      if (!statSync(f.path).isFile()) odd.push(f.path);
    } catch {
      // gone or unreadable: reported as a failed frame when its turn comes
    }
  }
  if (odd.length > 0) {
    const more = odd.length > 1 ? ` (and ${odd.length - 1} more: ${odd.slice(1, 4).join(', ')}${odd.length > 4 ? ', ...' : ''})` : '';
    throw new UserError(`${odd[0]}: not a regular file (a pipe, socket, device or folder): only regular files are frames${more}`);
  }
  // frame numbers: the name's last number when every frame has one, else the position
  const nums = out.map((f) => (Number.isNaN(f.number) ? lastNumber(f.name) : f.number));
  const allNumbered = nums.every((x) => x !== undefined);
  out.forEach((f, i) => (f.number = allNumbered ? nums[i]! : i + 1));
  const names = new Map<string, string>();
  for (const f of out) {
    const prev = names.get(f.name);
    if (prev) throw new UserError(`${f.path}: has the same base name as ${prev}; outputs keep base names, so warp them in separate runs`);
    names.set(f.name, f.path);
  }
  return out;
}

export function parseFrameRange(text: string): [number, number] {
  const m = /^\s*(\d+)\s*(?:-\s*(\d+)\s*)?$/.exec(text);
  if (!m) throw new UserError(`--frames: expected A-B (frame numbers), got "${text}"`);
  const a = Number(m[1]);
  const b = m[2] === undefined ? a : Number(m[2]);
  if (b < a) throw new UserError(`--frames: the range ends before it starts, got "${text}"`);
  return [a, b];
}

export function parseShard(text: string): [number, number] {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text);
  if (!m || Number(m[2]) < 1 || Number(m[1]) < 1 || Number(m[1]) > Number(m[2])) {
    throw new UserError(`--shard: expected K/N with 1 ≤ K ≤ N (frame K of every N), got "${text}"`);
  }
  return [Number(m[1]), Number(m[2])];
}

/** Applies --frames (by frame number) then --shard (by position in what remains). */
export function selectFrames(frames: Frame[], range?: [number, number], shard?: [number, number]): Frame[] {
  let sel = range ? frames.filter((f) => f.number >= range[0] && f.number <= range[1]) : frames;
  if (shard) sel = sel.filter((_, i) => i % shard[1] === shard[0] - 1);
  return sel;
}
