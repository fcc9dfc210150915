/**
 * A picture as an SVG document built as a string: shapes, embedded rasters and text drawn as glyph
 * outlines (typeface.ts). Every piece of text is kept with its box, so a test (or the label placer)
 * can read what a picture says and where, and the lines that text must keep clear of are kept too.
 */
import { css, type Rgb8 } from './colormap.js';
import type { Obstacle } from './label-placer.js';
import { layoutText, typeface, type FontWeight } from './typeface.js';

/** An axis-aligned box, top-left corner and size, in picture pixels (y down). */
export interface Box {
  x: number;
  y: number;
  w: number;
  h: number;
}

export interface Paint {
  fill?: Rgb8 | 'none';
  stroke?: Rgb8;
  /** Stroke width in pixels. */
  width?: number;
  opacity?: number;
  dash?: readonly number[];
  cap?: 'butt' | 'round';
}

export interface TextStyle {
  size: number;
  weight?: FontWeight;
  fill?: Rgb8;
  /** A paper-coloured outline behind the glyphs, so text stays legible over lines. */
  halo?: Rgb8;
  align?: 'start' | 'middle' | 'end';
  /** Which line of the text `y` gives: its top, middle, alphabetic baseline or bottom. */
  baseline?: 'top' | 'middle' | 'alphabetic' | 'bottom';
}

/** A piece of text in a picture: what it says and the box it covers. */
export interface PictureLabel {
  text: string;
  box: Box;
}

/** A finished picture: the SVG document, its size in pixels and the text it holds. */
export interface Picture {
  svg: string;
  width: number;
  height: number;
  labels: readonly PictureLabel[];
  /** Lines and shapes the labels were placed clear of. */
  keepClear: readonly Obstacle[];
}

const n = (v: number) => (Number.isInteger(v) ? String(v) : v.toFixed(2).replace(/\.?0+$/, ''));

export function escapeXml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function paintAttributes(p: Paint): string {
  const a: string[] = [];
  a.push(`fill="${p.fill === undefined || p.fill === 'none' ? 'none' : css(p.fill)}"`);
  if (p.stroke) {
    a.push(`stroke="${css(p.stroke)}"`, `stroke-width="${n(p.width ?? 1)}"`);
    if (p.dash) a.push(`stroke-dasharray="${p.dash.map(n).join(' ')}"`);
    if (p.cap) a.push(`stroke-linecap="${p.cap}"`);
    a.push('stroke-linejoin="round"');
  }
  if (p.opacity !== undefined && p.opacity < 1) a.push(`opacity="${n(p.opacity)}"`);
  return a.join(' ');
}

/** The box a text of this style covers when anchored at (x, y). */
export function textBox(text: string, x: number, y: number, style: TextStyle): { box: Box; baselineY: number; left: number } {
  const t = typeface(style.weight);
  const width = (layoutText(t, text).advance * style.size) / t.unitsPerEm;
  const asc = t.ascent * style.size;
  const desc = t.descent * style.size;
  const baseline = style.baseline ?? 'alphabetic';
  const baselineY = baseline === 'top' ? y + asc : baseline === 'middle' ? y + (asc - desc) / 2 : baseline === 'bottom' ? y - desc : y;
  const align = style.align ?? 'start';
  const left = align === 'middle' ? x - width / 2 : align === 'end' ? x - width : x;
  return { box: { x: left, y: baselineY - asc, w: width, h: asc + desc }, baselineY, left };
}

export class SvgPicture {
  private readonly glyphDefs = new Map<string, string>();
  private readonly body: string[] = [];
  readonly labels: PictureLabel[] = [];
  readonly keepClear: Obstacle[] = [];

  /** `id` prefixes the glyph ids, so several pictures can be inlined in one HTML page. */
  constructor(readonly width: number, readonly height: number, readonly id: string, readonly title: string, background?: Rgb8) {
    if (background) this.rect(0, 0, width, height, { fill: background });
  }

  rect(x: number, y: number, w: number, h: number, p: Paint): void {
    this.body.push(`<rect x="${n(x)}" y="${n(y)}" width="${n(w)}" height="${n(h)}" ${paintAttributes(p)}/>`);
  }

  line(x1: number, y1: number, x2: number, y2: number, p: Paint): void {
    this.body.push(`<line x1="${n(x1)}" y1="${n(y1)}" x2="${n(x2)}" y2="${n(y2)}" ${paintAttributes(p)}/>`);
  }

  /** An open polyline through [x0, y0, x1, y1, ...]. */
  polyline(points: readonly number[], p: Paint): void {
    this.body.push(`<polyline points="${pointList(points)}" ${paintAttributes(p)}/>`);
  }

  polygon(points: readonly number[], p: Paint): void {
    this.body.push(`<polygon points="${pointList(points)}" ${paintAttributes(p)}/>`);
  }

  circle(cx: number, cy: number, r: number, p: Paint): void {
    this.body.push(`<circle cx="${n(cx)}" cy="${n(cy)}" r="${n(r)}" ${paintAttributes(p)}/>`);
  }

  path(d: string, p: Paint): void {
    this.body.push(`<path d="${d}" ${paintAttributes(p)}/>`);
  }

  /** A raster (a data: URI) drawn into the box, one image pixel per picture pixel when the sizes match. */
  image(x: number, y: number, w: number, h: number, href: string): void {
    this.body.push(`<image x="${n(x)}" y="${n(y)}" width="${n(w)}" height="${n(h)}" preserveAspectRatio="none" style="image-rendering:pixelated" href="${href}"/>`);
  }

  /** Draws text as outlines at (x, y) and records it; returns the box it covers. */
  text(text: string, x: number, y: number, style: TextStyle): Box {
    const t = typeface(style.weight);
    const { box, baselineY, left } = textBox(text, x, y, style);
    const { glyphs, x: pen } = layoutText(t, text);
    const s = style.size / t.unitsPerEm;
    const uses: string[] = [];
    glyphs.forEach((g, k) => {
      const id = `${this.id}-${t.weight[0]}${g.index}`;
      if (!this.glyphDefs.has(id)) this.glyphDefs.set(id, g.getPath(0, 0, t.unitsPerEm).toPathData(0));
      if (this.glyphDefs.get(id) !== '') uses.push(`<use href="#${id}" x="${pen[k]}"/>`);
    });
    const at = `transform="translate(${n(left)} ${n(baselineY)}) scale(${s.toPrecision(6)})"`;
    const halo = style.halo ? `<g ${at} fill="none" stroke="${css(style.halo)}" stroke-width="${n(3 / s)}" stroke-linejoin="round">${uses.join('')}</g>` : '';
    const b = [box.x, box.y, box.w, box.h].map((v) => v.toFixed(1)).join(' ');
    this.body.push(`<g data-label="${escapeXml(text)}" data-box="${b}">${halo}<g ${at} fill="${css(style.fill ?? [0, 0, 0])}">${uses.join('')}</g></g>`);
    this.labels.push({ text, box });
    return box;
  }

  toString(): string {
    const defs = [...this.glyphDefs].filter(([, d]) => d !== '').map(([id, d]) => `<path id="${id}" d="${d}"/>`);
    return (
      `<svg xmlns="http://www.w3.org/2000/svg" width="${this.width}" height="${this.height}" viewBox="0 0 ${this.width} ${this.height}" role="img" aria-label="${escapeXml(this.title)}">` +
      `<title>${escapeXml(this.title)}</title><defs>${defs.join('')}</defs>\n${this.body.join('\n')}\n</svg>\n`
    );
  }

  finish(): Picture {
    return { svg: this.toString(), width: this.width, height: this.height, labels: this.labels, keepClear: this.keepClear };
  }
}

function pointList(points: readonly number[]): string {
  const out: string[] = [];
  for (let k = 0; k + 1 < points.length; k += 2) out.push(`${n(points[k])},${n(points[k + 1])}`);
  return out.join(' ');
}
