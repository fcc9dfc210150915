/**
 * Issue 10, error lines quote at most a short piece: a rig whose `dome.mesh` names a file longer than
 * any file system allows (found by the on-demand fuzz run, seed 20261203) used to be quoted whole, twice,
 * in one line thousands of characters long. Now one short line names the rig and the field.
 */
import { rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { demoRigText, skyfold, tempDir } from './support.js';

const dir = tempDir('skyfold-longname-');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('a dome.mesh name too long for a file name', () => {
  for (const name of ['x'.repeat(3000), 'ab/'.repeat(400) + 'dome.obj']) {
    it(`is refused in one short line (${name.length} characters)`, async () => {
      const rig = join(dir, `rig-${name.length}.yaml`);
      writeFileSync(rig, demoRigText([320, 200]).replace(/^dome:\n/m, `dome:\n  mesh: "${name}"\n`));
      const r = await skyfold(['probe', rig, '--pixel', '10,10']);
      expect(r.code, r.stderr).toBe(2);
      const lines = r.stderr.trimEnd().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(new RegExp(`^skyfold: .*rig-${name.length}\\.yaml: dome\\.mesh: ".{59}…" is ${name.length} characters long`));
      expect(lines[0].length).toBeLessThan(400);
    });
  }
});
