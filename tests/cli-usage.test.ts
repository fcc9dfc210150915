/**
 * The command line itself, in one voice (issue 15): help on standard output, every usage error one
 * line `skyfold: ...` with exit 2 (DESIGN.md "Commands"), enumerations and numbers checked by the
 * option parsers before any work starts.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_RIG, skyfold, tempDir, type Run } from './support.js';

const dir = tempDir('usage');
const run = (...args: string[]) => skyfold(args, { cwd: dir });

/** Exit 2, nothing on standard output, exactly one line on standard error; returns that line. */
function usageLine(r: Run): string {
  expect(r.code, r.stderr).toBe(2);
  expect(r.stdout).toBe('');
  const lines = r.stderr.split('\n');
  expect(lines, r.stderr).toHaveLength(2); // one line and its newline
  expect(lines[0]).toMatch(/^skyfold: /);
  return lines[0];
}

describe('help goes to standard output', () => {
  it('bare skyfold prints the help there and exits 2 (no command given)', async () => {
    const r = await run();
    expect(r.code).toBe(2);
    expect(r.stdout).toMatch(/^Usage: skyfold /);
    expect(r.stdout).toContain('probe');
    expect(r.stderr).toBe('');
  });

  it('--help, help CMD and CMD --help exit 0', async () => {
    for (const args of [['--help'], ['help'], ['help', 'warp'], ['warp', '--help'], ['pattern', 'dome', '--help']]) {
      const r = await run(...args);
      expect(r.code, args.join(' ')).toBe(0);
      expect(r.stdout, args.join(' ')).toMatch(/^Usage: skyfold/);
      expect(r.stderr, args.join(' ')).toBe('');
    }
    expect((await run('help', 'warp')).stdout).toMatch(/^Usage: skyfold warp /);
  });

  it('a command group without its subcommand prints its help there and exits 2', async () => {
    const r = await run('pattern');
    expect(r.code).toBe(2);
    expect(r.stdout).toMatch(/^Usage: skyfold pattern /);
    expect(r.stderr).toBe('');
  });
});

describe('usage errors: one line in skyfold\'s voice, exit 2', () => {
  it('an enumerated option names the choices and what came', async () => {
    expect(usageLine(await run('warp', DEMO_RIG, 'x.png', '-o', 'out', '--filter', 'cubic'))).toBe('skyfold: --filter: expected one of nearest, bilinear, area, got "cubic"');
    expect(usageLine(await run('init', '--units', 'yd'))).toBe('skyfold: --units: expected one of m, ft, got "yd"');
  });

  it('--rotate takes any angle (issue 12), and refuses what is not one', async () => {
    expect(usageLine(await run('warp', DEMO_RIG, 'x.png', '-o', 'out', '--rotate', 'left'))).toBe('skyfold: --rotate: expected an angle in degrees, got "left"');
  });

  it('numbers: positive integers, numbers in a range, sizes, directions', async () => {
    expect(usageLine(await run('warp', DEMO_RIG, 'x.png', '-o', 'out', '--jobs', '0'))).toBe('skyfold: --jobs: expected a positive whole number, got "0"');
    expect(usageLine(await run('warp', DEMO_RIG, 'x.png', '-o', 'out', '--jobs', '2.5'))).toBe('skyfold: --jobs: expected a positive whole number, got "2.5"');
    expect(usageLine(await run('simulate', DEMO_RIG, 'x.png', '-o', 'y.png', '--size', ''))).toBe('skyfold: --size: expected a positive whole number, got ""');
    expect(usageLine(await run('warp', DEMO_RIG, 'x.png', '-o', 'out', '--brightness', '1.5'))).toBe('skyfold: --brightness: expected a number from 0 to 1, got "1.5"');
    expect(usageLine(await run('warp', DEMO_RIG, 'x.png', '-o', 'out', '--quality', 'NaN'))).toBe('skyfold: --quality: expected a number from 1 to 100, got "NaN"');
    expect(usageLine(await run('bake', DEMO_RIG, '-o', 'm.glb', '--grid', '1x61'))).toBe('skyfold: --grid: expected COLSxROWS with at least 2 each (e.g. 321x201), got "1x61"');
    expect(usageLine(await run('pattern', 'markers', '--resolution', '0x400', '--markers', '1,1', '-o', 'm.png'))).toBe(
      'skyfold: --resolution: expected WIDTHxHEIGHT in pixels, e.g. 1920x1200, got "0x400"',
    );
    expect(usageLine(await run('locate', DEMO_RIG, '--direction', '0,91'))).toBe('skyfold: --direction: expected an altitude from -90 to 90 degrees, got "0,91"');
    expect(usageLine(await run('pattern', 'dome', '-o', 'd.png', '--dot', '30'))).toBe('skyfold: --dot: expected AZ,ALT (azimuth and altitude in degrees), got "30"');
  });

  it('frame ranges and shards are checked as options, before any frame is read', async () => {
    expect(usageLine(await run('warp', DEMO_RIG, 'missing/', '-o', 'out', '--frames', '5-3'))).toBe('skyfold: --frames: the range ends before it starts, got "5-3"');
    expect(usageLine(await run('warp', DEMO_RIG, 'missing/', '-o', 'out', '--shard', '4/3'))).toBe('skyfold: --shard: expected K/N with 1 ≤ K ≤ N (frame K of every N), got "4/3"');
  });

  it('unknown options and commands, with the suggestion on the same line', async () => {
    expect(usageLine(await run('probe', DEMO_RIG, '--pixel', '1,1', '--jsn'))).toBe("skyfold: unknown option '--jsn'; did you mean --json?");
    expect(usageLine(await run('prob'))).toBe("skyfold: unknown command 'prob'; did you mean probe?");
  });

  it('missing arguments and options', async () => {
    expect(usageLine(await run('probe', '--pixel', '1,1'))).toBe("skyfold: missing required argument 'rig'");
    expect(usageLine(await run('probe', DEMO_RIG))).toBe("skyfold: required option '--pixel <x,y>' not specified");
    expect(usageLine(await run('probe', DEMO_RIG, '--pixel'))).toBe("skyfold: option '--pixel <x,y>' argument missing");
  });
});
