/**
 * The pictures' typeface: DejaVu Sans, read from the @fontsource/dejavu-sans package (Bitstream Vera
 * licence with the DejaVu changes in the public domain: free to use and redistribute) by opentype.js.
 * Text is drawn as glyph outlines, never as SVG <text>, so a machine with no fonts installed renders
 * the same picture. Glyphs are laid out one by one on their advance widths (no shaping: labels are
 * short Latin text, and opentype.js 2.0 cannot apply this font's contextual substitutions).
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import opentype, { type Font, type Glyph } from 'opentype.js';

export type FontWeight = 'regular' | 'bold';

const FILES: Record<FontWeight, string> = {
  regular: '@fontsource/dejavu-sans/files/dejavu-sans-latin-400-normal.woff',
  bold: '@fontsource/dejavu-sans/files/dejavu-sans-latin-700-normal.woff',
};

export interface Typeface {
  weight: FontWeight;
  font: Font;
  unitsPerEm: number;
  /** Top of the tallest letters and bottom of the descenders, in em (positive up, positive down). */
  ascent: number;
  descent: number;
}

const loaded = new Map<FontWeight, Typeface>();

export function typeface(weight: FontWeight = 'regular'): Typeface {
  let t = loaded.get(weight);
  if (t) return t;
  const file = createRequire(import.meta.url).resolve(FILES[weight]);
  const bytes = readFileSync(file);
  const font = opentype.parse(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer);
  const em = font.unitsPerEm;
  const top = Math.max(...[...'Hdlbf°'].map((c) => font.glyphs.get(font.charToGlyphIndex(c)).getBoundingBox().y2));
  const bottom = Math.min(...[...'gjpqy'].map((c) => font.glyphs.get(font.charToGlyphIndex(c)).getBoundingBox().y1));
  t = { weight, font, unitsPerEm: em, ascent: top / em, descent: -bottom / em };
  loaded.set(weight, t);
  return t;
}

/** The glyphs of a string with their pen positions in font units; a character the font lacks becomes its .notdef box. */
export function layoutText(t: Typeface, text: string): { glyphs: Glyph[]; x: number[]; advance: number } {
  const glyphs: Glyph[] = [];
  const x: number[] = [];
  let pen = 0;
  for (const ch of text) {
    const g = t.font.glyphs.get(t.font.charToGlyphIndex(ch));
    glyphs.push(g);
    x.push(pen);
    pen += g.advanceWidth ?? 0;
  }
  return { glyphs, x, advance: pen };
}

/** Whether the font draws this character (not the .notdef box). */
export function hasGlyph(ch: string, weight: FontWeight = 'regular'): boolean {
  return typeface(weight).font.charToGlyphIndex(ch) > 0;
}

/** Width of a string at `size` pixels per em. */
export function textWidth(text: string, size: number, weight: FontWeight = 'regular'): number {
  const t = typeface(weight);
  return (layoutText(t, text).advance * size) / t.unitsPerEm;
}
