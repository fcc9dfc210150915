/** Issue 10: the atomic writer never writes through a link planted at its temporary name, nor removes it. */
import { existsSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, expect, it } from 'vitest';
import { tempPathFor, writeFileAtomic } from '../src/io/output-file.js';

const dir = mkdtempSync(join(tmpdir(), 'skyfold-atomic-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

it('a link planted at the temporary name is not followed, and not removed', () => {
  const victim = join(dir, 'victim.txt');
  writeFileSync(victim, 'precious\n');
  const temp = join(dir, '.planted.partial');
  symlinkSync(victim, temp);
  expect(() => writeFileAtomic(join(dir, 'target.txt'), 'new', temp)).toThrow(/EEXIST/);
  expect(readFileSync(victim, 'utf8')).toBe('precious\n');
  expect(existsSync(temp)).toBe(true);
  expect(existsSync(join(dir, 'target.txt'))).toBe(false);
});

it('temporary names differ from call to call (nobody can plant a link in advance)', () => {
  const a = tempPathFor(join(dir, 'x.glb'));
  const b = tempPathFor(join(dir, 'x.glb'));
  expect(a).not.toBe(b);
  expect(a).toMatch(/\/\.x\.glb\.\w+\.\d+\.[0-9a-f]{12}\.partial$/);
});
