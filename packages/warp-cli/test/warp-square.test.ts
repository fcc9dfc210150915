/** A dome master is square: a frame of another shape is refused with the reason, unless --non-square says otherwise. */
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { UserError } from '../src/errors.js';
import { checkSquare, loadMapSource } from '../src/warp/map-source.js';

const RIG = fileURLToPath(new URL('../../../fixtures/golden/warp-rig-320x200.yaml', import.meta.url));

describe('non-square frames', () => {
  it('are refused with the reason and the way out', () => {
    // docs/design.md, fisheye convention: the content circle of a dome master touches all four sides
    const reason = 'the frames are 2048x1536, not square: a dome master is square, its fisheye circle touching all four sides; pass --non-square to warp them anyway (the circle stretched over the whole frame)';
    expect(() => checkSquare([2048, 1536], {})).toThrow(new UserError(reason));
    expect(() => checkSquare([4096, 2048], {})).toThrow(/^the frames are 4096x2048, not square/);
    expect(() => checkSquare([2048, 2048], {})).not.toThrow();
    expect(() => checkSquare([2048, 1536], { nonSquare: true })).not.toThrow();
  });

  it('stop the warp before any map is built, and are warped when asked for', async () => {
    const source = await loadMapSource(RIG);
    expect(() => source.build([64, 48], {})).toThrow(UserError);
    const map = source.build([64, 48], { nonSquare: true });
    expect([map.width, map.height]).toEqual([320, 200]);
  });
});
