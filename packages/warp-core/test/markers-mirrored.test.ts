/** A mirrored marker label is the plain label flipped left-right, in the same place. */
import { describe, expect, it } from 'vitest';
import { drawMarkerFrame } from '../src/pattern/markers.js';

describe('mirrored marker labels', () => {
  it('draw the same pixels as the plain label, flipped left-right within its box', () => {
    const plain = drawMarkerFrame(480, 300, [{ x: 200, y: 150, label: '27' }]);
    const flipped = drawMarkerFrame(480, 300, [{ x: 200, y: 150, label: '27', mirrored: true }]);
    const lit = (img: typeof plain, x: number, y: number) => img.data[3 * (y * img.width + x)] > 128;
    // the label's box: the lit pixels where the two frames differ (the crosshair is the same in both)
    let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
    for (let y = 0; y < 300; y++)
      for (let x = 0; x < 480; x++)
        if (lit(plain, x, y) !== lit(flipped, x, y)) {
          x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y);
        }
    expect(x1 - x0).toBeGreaterThan(4); // "27" is not its own mirror image
    for (let y = y0; y <= y1; y++) for (let x = x0; x <= x1; x++) expect(lit(flipped, x, y)).toBe(lit(plain, x0 + x1 - x, y));
  });
});
