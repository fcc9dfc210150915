/** Which frames a `warp` run covers: natural sort, sequence patterns, frame numbers, --frames and --shard. */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { UserError } from '../src/errors.js';
import { expandInputs, naturalCompare, parseFrameRange, parseShard, selectFrames, type Frame } from '../src/warp/inputs.js';

let dir: string;

/** Empty files are enough: expansion looks at names only. */
function folder(name: string, files: string[]): string {
  const d = join(dir, name);
  mkdirSync(d, { recursive: true });
  for (const f of files) writeFileSync(join(d, f), '');
  return d;
}

const names = (frames: Frame[]) => frames.map((f) => f.name);
const numbers = (frames: Frame[]) => frames.map((f) => f.number);

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-inputs-'));
});

afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

describe('naturalCompare', () => {
  it('orders numbers inside names by value', () => {
    const list = ['frame10.png', 'frame2.png', 'frame1.png', 'frame100.png', 'frame02.png'];
    expect([...list].sort(naturalCompare)).toEqual(['frame1.png', 'frame02.png', 'frame2.png', 'frame10.png', 'frame100.png']);
  });

  it('is a total order: names equal to the collator still get a fixed place', () => {
    expect(naturalCompare('a.png', 'A.png')).not.toBe(0);
    expect(Math.sign(naturalCompare('a.png', 'A.png'))).toBe(-Math.sign(naturalCompare('A.png', 'a.png')));
    expect(naturalCompare('x', 'x')).toBe(0);
  });
});

describe('expandInputs: folders', () => {
  it('lists the images of a folder in natural order, skipping hidden files and other files', () => {
    const d = folder('nat', ['shot_10.png', 'shot_9.PNG', 'shot_1.jpg', 'shot_2.tif', '.shot_3.png', 'notes.txt', 'shot_4.exr', 'shot_5.webp', 'shot_6.jpeg', 'shot_7.tiff']);
    const frames = expandInputs([d]);
    expect(names(frames)).toEqual(['shot_1', 'shot_2', 'shot_5', 'shot_6', 'shot_7', 'shot_9', 'shot_10']);
    expect(frames[0].path).toBe(join(d, 'shot_1.jpg'));
    // every name carries a number: that is the frame number
    expect(numbers(frames)).toEqual([1, 2, 5, 6, 7, 9, 10]);
  });

  it('takes the last number of a name as its frame number', () => {
    const d = folder('last', ['take2_frame_0007.png', 'take2_frame_0008.png']);
    expect(numbers(expandInputs([d]))).toEqual([7, 8]);
  });

  it('numbers frames by position from 1 when some name has no number', () => {
    const d = folder('mixed', ['b7.png', 'a.png', 'c3.png']);
    const frames = expandInputs([d]);
    expect(names(frames)).toEqual(['a', 'b7', 'c3']);
    expect(numbers(frames)).toEqual([1, 2, 3]);
  });

  it('refuses a folder without images, and a path that does not exist', () => {
    const d = folder('empty', ['readme.txt']);
    expect(() => expandInputs([d])).toThrow(UserError);
    expect(() => expandInputs([d])).toThrow(`${d}: the folder holds no images (.png .jpg .jpeg .tif .tiff .webp)`);
    expect(() => expandInputs([join(dir, 'nowhere')])).toThrow(`${join(dir, 'nowhere')}: no such file or folder`);
  });
});

describe('expandInputs: files and duplicates', () => {
  it('keeps the order of the arguments and drops a frame given twice', () => {
    const d = folder('files', ['z9.png', 'a1.png']);
    const frames = expandInputs([join(d, 'z9.png'), join(d, 'a1.png'), join(d, '.', 'z9.png'), d]);
    expect(names(frames)).toEqual(['z9', 'a1']);
    expect(numbers(frames)).toEqual([9, 1]);
  });

  it('refuses two frames with the same base name (their outputs would collide)', () => {
    const a = folder('dupA', ['f1.png']);
    const b = folder('dupB', ['f1.jpg']);
    expect(() => expandInputs([a, b])).toThrow(`${join(b, 'f1.jpg')}: has the same base name as ${join(a, 'f1.png')}; outputs keep base names, so warp them in separate runs`);
  });
});

describe('expandInputs: numbered sequences', () => {
  it('expands %05d in number order with the sequence number as frame number', () => {
    const d = folder('seq5', ['show_00010.png', 'show_00002.png', 'show_00001.png', 'show_100000.png', 'show_0003.png', 'show_00004.jpg', 'other_00001.png']);
    const frames = expandInputs([join(d, 'show_%05d.png')]);
    // %05d takes at least five digits (a sequence may run past 99999), never fewer
    expect(names(frames)).toEqual(['show_00001', 'show_00002', 'show_00010', 'show_100000']);
    expect(numbers(frames)).toEqual([1, 2, 10, 100000]);
    expect(frames[0].path).toBe(join(d, 'show_00001.png'));
  });

  it('expands an unpadded %d', () => {
    const d = folder('seqd', ['f10.png', 'f9.png', 'f011.png', 'fx.png']);
    const frames = expandInputs([join(d, 'f%d.png')]);
    expect(names(frames)).toEqual(['f9', 'f10', 'f011']);
    expect(numbers(frames)).toEqual([9, 10, 11]);
  });

  it('treats regular-expression characters in the pattern literally', () => {
    const d = folder('seqre', ['a+b (1).0001.png', 'aab (1)x0002.png']);
    expect(names(expandInputs([join(d, 'a+b (1).%04d.png')]))).toEqual(['a+b (1).0001']);
  });

  it('refuses a pattern that matches nothing', () => {
    const d = folder('seqnone', ['x_1.png']);
    expect(() => expandInputs([join(d, 'y_%04d.png')])).toThrow(`${join(d, 'y_%04d.png')}: no files match this sequence`);
  });
});

describe('parseFrameRange and parseShard', () => {
  it('reads A-B and a single frame', () => {
    expect(parseFrameRange('3-5')).toEqual([3, 5]);
    expect(parseFrameRange(' 7 ')).toEqual([7, 7]);
    expect(parseFrameRange('0 - 10')).toEqual([0, 10]);
  });

  it('rejects malformed and backwards ranges with the option named', () => {
    expect(() => parseFrameRange('5-3')).toThrow('--frames: the range ends before it starts, got "5-3"');
    for (const bad of ['', 'a-b', '1-', '-3', '1..4', '2-3-4', '1.5-3']) {
      expect(() => parseFrameRange(bad)).toThrow(`--frames: expected A-B (frame numbers), got "${bad}"`);
    }
  });

  it('reads K/N with K from 1', () => {
    expect(parseShard('1/3')).toEqual([1, 3]);
    expect(parseShard(' 3 / 3 ')).toEqual([3, 3]);
    expect(parseShard('1/1')).toEqual([1, 1]);
  });

  it('rejects K outside 1..N', () => {
    for (const bad of ['0/3', '4/3', '1/0', '3', '1-3', 'a/b']) {
      expect(() => parseShard(bad)).toThrow(`--shard: expected K/N with 1 ≤ K ≤ N (frame K of every N), got "${bad}"`);
    }
  });
});

describe('selectFrames', () => {
  const show: Frame[] = Array.from({ length: 10 }, (_, i) => ({ path: `s/f${i + 11}.png`, name: `f${i + 11}`, number: i + 11 }));

  it('--frames selects by frame number, inclusive', () => {
    expect(numbers(selectFrames(show, [13, 15]))).toEqual([13, 14, 15]);
    expect(numbers(selectFrames(show, [1, 3]))).toEqual([]);
    expect(numbers(selectFrames(show, [20, 99]))).toEqual([20]);
  });

  it('--shard K/N takes frame K of every N; the shards partition the show', () => {
    expect(numbers(selectFrames(show, undefined, [1, 3]))).toEqual([11, 14, 17, 20]);
    expect(numbers(selectFrames(show, undefined, [2, 3]))).toEqual([12, 15, 18]);
    expect(numbers(selectFrames(show, undefined, [3, 3]))).toEqual([13, 16, 19]);
    for (const n of [1, 2, 3, 4, 7, 10, 11]) {
      const all = Array.from({ length: n }, (_, k) => selectFrames(show, undefined, [k + 1, n])).flat();
      expect(numbers(all).sort((a, b) => a - b)).toEqual(numbers(show));
    }
  });

  it('applies the range first, then shards what remains by position', () => {
    expect(numbers(selectFrames(show, [14, 19], [1, 2]))).toEqual([14, 16, 18]);
    expect(numbers(selectFrames(show, [14, 19], [2, 2]))).toEqual([15, 17, 19]);
  });

  it('leaves the input list alone', () => {
    const copy = show.map((f) => ({ ...f }));
    selectFrames(show, [12, 14], [1, 2]);
    expect(show).toEqual(copy);
  });
});
