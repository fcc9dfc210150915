/** The pictures' text styles and the ink, faint and paper colours they share. */
import { PALETTE } from './colormap.js';
import type { TextStyle } from './svg.js';

export const INK = PALETTE.ink;
export const FAINT = PALETTE.faint;
export const PAPER = PALETTE.paper;

export const TITLE: TextStyle = { size: 20, weight: 'bold', fill: INK };
export const SUBTITLE: TextStyle = { size: 12.5, fill: FAINT };
export const LABEL: TextStyle = { size: 12, fill: INK };
export const NOTE: TextStyle = { size: 11.5, fill: FAINT };
/** A label over lines or colour: drawn with a paper halo. */
export const ON_MAP: TextStyle = { size: 12, fill: INK, halo: [255, 255, 255] };

/** The title and subtitle every picture starts with. */
export function heading(pic: { text(t: string, x: number, y: number, s: TextStyle): unknown }, title: string, subtitle: string): void {
  pic.text(title, 24, 34, TITLE);
  pic.text(subtitle, 24, 58, SUBTITLE);
}
