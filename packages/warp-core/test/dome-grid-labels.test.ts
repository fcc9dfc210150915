/** The dome grid names its azimuths every 30° (F, R, B, L and numbers between), and its B cannot be read as an 8. */
import { describe, expect, it } from 'vitest';
import { DEG } from '../src/math.js';
import { FONT_CHARACTERS, GLYPH_HEIGHT, GLYPH_WIDTH, glyphCell, textSize } from '../src/pattern/digit-font.js';
import { drawDomePattern, PATTERN_COLORS } from '../src/pattern/dome-master.js';
import type { RgbImage } from '../src/pattern/raster.js';

const N = 1024;
const img = drawDomePattern({ size: N });

/** The characters drawn with their box's top-left at (left, top), cell by cell, '?' where no glyph fits. */
function readText(im: RgbImage, left: number, top: number, scale: number, count: number): string {
  const lit = (x: number, y: number) => im.data[3 * (y * im.width + x)] > 128;
  let out = '';
  for (let n = 0; n < count; n++) {
    const cells: boolean[] = [];
    for (let row = 0; row < GLYPH_HEIGHT; row++)
      for (let col = 0; col < GLYPH_WIDTH; col++) cells.push(lit(left + (n * (GLYPH_WIDTH + 1) + col) * scale + Math.floor(scale / 2), top + row * scale + Math.floor(scale / 2)));
    const match = FONT_CHARACTERS.filter((ch) => cells.every((on, k) => glyphCell(ch, k % GLYPH_WIDTH, Math.floor(k / GLYPH_WIDTH)) === on));
    out += match.length === 1 ? match[0] : '?';
  }
  return out;
}

describe('the dome grid labels', () => {
  it('numbers the azimuths every 30° between the letters, where the letters stand', () => {
    // the letters' circle and scale as dome-master.ts draws them (the direction marks' size N/48)
    const size = Math.max(6, N / 48);
    const rimRho = N / 2 - 2 * Math.max(1, N / 1024) - size * 1.9;
    const ls = Math.max(1, Math.round(size / 6));
    for (let deg = 0; deg < 360; deg += 30) {
      const text = deg % 90 === 0 ? 'FRBL'[deg / 90] : String(deg);
      const [w, h] = textSize(text, ls);
      const cx = N / 2 + rimRho * Math.sin(deg * DEG);
      const cy = N / 2 + rimRho * Math.cos(deg * DEG);
      expect(readText(img, Math.round(cx - w / 2), Math.round(cy - h / 2), ls, text.length), `azimuth ${deg}°`).toBe(text);
    }
    // the numbers in the side colour, not the front's amber
    expect(PATTERN_COLORS.side).not.toEqual(PATTERN_COLORS.front);
  });

  it('draws B so that at least a third of its cells differ from the digit 8', () => {
    let differ = 0;
    for (let row = 0; row < GLYPH_HEIGHT; row++) for (let col = 0; col < GLYPH_WIDTH; col++) if (glyphCell('B', col, row) !== glyphCell('8', col, row)) differ++;
    expect(differ).toBeGreaterThanOrEqual((GLYPH_WIDTH * GLYPH_HEIGHT) / 3);
  });
});
