/**
 * A tiny bitmap font of our own for pattern labels: digits, a few capitals for the dome's directions,
 * and some signs, each 3 cells wide and 5 tall, drawn as square blocks of `scale` pixels with one
 * empty column between glyphs.
 */
import { blendPixel, type Rgb, type RgbImage } from './raster.js';

/** Rows top to bottom, '#' = on. */
const GLYPHS: Readonly<Record<string, readonly string[]>> = {
  '0': ['###', '#.#', '#.#', '#.#', '###'],
  '1': ['.#.', '##.', '.#.', '.#.', '###'],
  '2': ['###', '..#', '###', '#..', '###'],
  '3': ['###', '..#', '.##', '..#', '###'],
  '4': ['#.#', '#.#', '###', '..#', '..#'],
  '5': ['###', '#..', '###', '..#', '###'],
  '6': ['###', '#..', '###', '#.#', '###'],
  '7': ['###', '..#', '..#', '.#.', '.#.'],
  '8': ['###', '#.#', '###', '#.#', '###'],
  '9': ['###', '#.#', '###', '..#', '###'],
  F: ['###', '#..', '##.', '#..', '#..'],
  R: ['##.', '#.#', '##.', '#.#', '#.#'],
  // the back: a lower-case b, an open top and one bowl, so it cannot be read as the digit 8
  B: ['#..', '#..', '##.', '#.#', '##.'],
  L: ['#..', '#..', '#..', '#..', '###'],
  '-': ['...', '...', '###', '...', '...'],
  '.': ['...', '...', '...', '...', '.#.'],
  ' ': ['...', '...', '...', '...', '...'],
};

export const GLYPH_WIDTH = 3;
export const GLYPH_HEIGHT = 5;

/** The characters the font can draw. */
export const FONT_CHARACTERS: readonly string[] = Object.keys(GLYPHS);

/** True when cell (col, row) of the glyph for `ch` is on. */
export function glyphCell(ch: string, col: number, row: number): boolean {
  const g = GLYPHS[ch];
  return g !== undefined && g[row]?.[col] === '#';
}

/** Width and height in pixels of `text` drawn at `scale`. */
export function textSize(text: string, scale: number): [number, number] {
  const n = text.length;
  return [n === 0 ? 0 : (n * (GLYPH_WIDTH + 1) - 1) * scale, GLYPH_HEIGHT * scale];
}

/**
 * Draws `text` with its top-left corner at pixel (left, top) (rounded to whole pixels), each cell a
 * scale × scale block, on a plate of `backdrop` one cell wider all round when given (so lines under
 * the text do not garble it). Throws on a character the font does not have.
 */
export function drawText(img: RgbImage, text: string, left: number, top: number, scale: number, color: Rgb, backdrop?: Rgb): void {
  const s = Math.max(1, Math.round(scale));
  const x0 = Math.round(left);
  const y0 = Math.round(top);
  if (backdrop) {
    const [w, h] = textSize(text, s);
    for (let j = y0 - s; j < y0 + h + s; j++) for (let i = x0 - s; i < x0 + w + s; i++) blendPixel(img, i, j, backdrop, 1);
  }
  [...text].forEach((ch, n) => {
    if (GLYPHS[ch] === undefined) throw new Error(`Expected one of ${FONT_CHARACTERS.join('')} in pattern text but received ${JSON.stringify(ch)}`);
    for (let row = 0; row < GLYPH_HEIGHT; row++) {
      for (let col = 0; col < GLYPH_WIDTH; col++) {
        if (!glyphCell(ch, col, row)) continue;
        const bx = x0 + (n * (GLYPH_WIDTH + 1) + col) * s;
        const by = y0 + row * s;
        for (let j = 0; j < s; j++) for (let i = 0; i < s; i++) blendPixel(img, bx + i, by + j, color, 1);
      }
    }
  });
}

/** Draws `text` centred on (cx, cy). */
export function drawTextCentred(img: RgbImage, text: string, cx: number, cy: number, scale: number, color: Rgb, backdrop?: Rgb): void {
  const s = Math.max(1, Math.round(scale));
  const [w, h] = textSize(text, s);
  drawText(img, text, cx - w / 2, cy - h / 2, s, color, backdrop);
}
