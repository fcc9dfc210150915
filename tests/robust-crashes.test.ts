/**
 * Issue 10, crashes on ordinary input: none of these may end in exit 3. Each runs the CLI's entry
 * point in-process on temporary files and expects exit 2 with one short line naming the file.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runCli, userErrorLine } from './robust-harness.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const DEMO = readFileSync(join(ROOT, 'fixtures', 'demo-rig.yaml'), 'utf8');
let dir: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'skyfold-robust-'));
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

function file(name: string, text: string): string {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
}

function demoWith(resolution: string): string {
  return DEMO.replace('resolution: [1920, 1200]', `resolution: ${resolution}`);
}

async function expectRefused(path: string, ...args: string[]): Promise<string> {
  const r = await runCli(...args);
  const line = userErrorLine(r, path);
  expect(line, `exit ${r.code}\n${r.stderr}`).toBeDefined();
  expect(line!.length).toBeLessThan(300);
  return line!;
}

describe('documents that used to reach an internal error', () => {
  it('a YAML alias bomb is refused, naming the file', async () => {
    // "billion laughs": each level repeats the previous ten times
    const lines = ['a0: &a0 [x, x, x, x, x, x, x, x, x, x]'];
    for (let i = 1; i < 12; i++) lines.push(`a${i}: &a${i} [${Array(10).fill(`*a${i - 1}`).join(', ')}]`);
    const p = file('bomb.yaml', lines.join('\n') + '\n');
    expect(await expectRefused(p, 'probe', p, '--pixel', '1,1')).toMatch(/alias/);
  });

  it('an alias to an anchor that is never set is refused', async () => {
    const p = file('undefined-alias.yaml', 'dome: *nowhere\n');
    expect(await expectRefused(p, 'probe', p, '--pixel', '1,1')).toMatch(/alias/i);
  });

  it('5000-deep JSON is refused as too deeply nested', async () => {
    const p = file('deep.json', '['.repeat(5000) + ']'.repeat(5000));
    expect(await expectRefused(p, 'probe', p, '--pixel', '1,1')).toMatch(/nested more than \d+ levels/);
  });

  it('5000-deep YAML flow lists are refused as too deeply nested', async () => {
    const p = file('deep.yaml', 'dome: ' + '['.repeat(5000) + ']'.repeat(5000) + '\n');
    expect(await expectRefused(p, 'probe', p, '--pixel', '1,1')).toMatch(/nested/);
  });

  it('YAML nesting deeper than the bound in block style is refused', async () => {
    let text = '';
    for (let i = 0; i < 40; i++) text += ' '.repeat(i) + `k${i}:\n`;
    const p = file('deep-block.yaml', text + ' '.repeat(40) + 'x: 1\n');
    expect(await expectRefused(p, 'probe', p, '--pixel', '1,1')).toMatch(/nested more than \d+ levels/);
  });
});

describe('projector.resolution has an upper bound', () => {
  it.each([
    ['[20000, 20000]', 'huge'],
    ['[769412786633, 1200]', 'absurd'],
    ['[8193, 1200]', 'just over 8K'],
  ])('%s (%s) is refused with the 8K bound', async (res) => {
    const p = file(`res-${res.replace(/\D+/g, '-')}.yaml`, demoWith(res));
    const line = await expectRefused(p, 'probe', p, '--pixel', '1,1');
    expect(line).toContain('projector.resolution');
    expect(line).toContain('8192');
  });

  it('[8192, 4320] is accepted', async () => {
    const p = file('res-8k.yaml', demoWith('[8192, 4320]'));
    const r = await runCli('probe', p, '--pixel', '4096.5,2160.5', '--json');
    expect(r.code, r.stderr).toBe(0);
  });
});

describe('raw pipe sizes are bounded', () => {
  it('--raw-in 100000x100000 is refused before anything is allocated', async () => {
    const p = file('raw.yaml', demoWith('[320, 200]'));
    const r = await runCli('warp', p, '--raw-in', '100000x100000');
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/--raw-in: a 100000x100000 frame is more than \d+ pixels/);
  });

  it('a size with absurdly many digits is refused with a short quote', async () => {
    const p = file('raw2.yaml', demoWith('[320, 200]'));
    const r = await runCli('warp', p, '--raw-in', '9'.repeat(5000) + 'x10');
    expect(r.code).toBe(2);
    expect(r.stderr.length).toBeLessThan(200);
  });
});
