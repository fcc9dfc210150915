/** The pictures' building blocks: the label font and the colour map. */
import { describe, expect, it } from 'vitest';
import { dusk, oklabLightness } from '../src/pictures/colormap.js';
import { hasLabelGlyph } from '../src/pictures/label-font.js';

describe('raster: labels and colour', () => {
  it('has a glyph for every letter, digit and the degree sign', () => {
    for (const ch of 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789°%.,:-+/()') expect(hasLabelGlyph(ch), ch).toBe(true);
  });

  it('"dusk" rises in OKLab lightness from end to end', () => {
    let prev = -1;
    for (let k = 0; k <= 64; k++) {
      const L = oklabLightness(dusk(k / 64));
      expect(L).toBeGreaterThan(prev);
      prev = L;
    }
  });
});
