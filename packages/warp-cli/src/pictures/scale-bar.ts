/** A vertical colour scale with ticks and a title, drawn beside a map. */
import { drawLabel } from './label-font.js';
import { drawLine, fillRect, strokeRect, type RasterImage, type Rgb8 } from './raster.js';

export interface ScaleBarOptions {
  x: number;
  y: number;
  width: number;
  height: number;
  /** Value at the bottom and at the top of the bar. */
  min: number;
  max: number;
  /** Colour for t ∈ [0, 1] (bottom → top). */
  colour: (t: number) => Rgb8;
  ticks: readonly number[];
  format: (v: number) => string;
  title?: string;
  ink: Rgb8;
}

/** "Nice" tick values covering [lo, hi] with about `count` steps (1, 2, 5 × 10^k). */
export function niceTicks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * p).find((s) => s >= raw) ?? 10 * p;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + 1e-9 * step; v += step) out.push(Math.abs(v) < 1e-12 * step ? 0 : v);
  return out;
}

export function drawScaleBar(img: RasterImage, o: ScaleBarOptions): void {
  for (let j = 0; j < o.height; j++) {
    const t = 1 - j / Math.max(1, o.height - 1);
    fillRect(img, o.x, o.y + j, o.width, 1, o.colour(t));
  }
  strokeRect(img, o.x - 1, o.y - 1, o.width + 2, o.height + 2, o.ink);
  for (const v of o.ticks) {
    const t = (v - o.min) / (o.max - o.min);
    if (!(t >= -1e-9 && t <= 1 + 1e-9)) continue;
    const y = o.y + (1 - t) * (o.height - 1) + 0.5;
    drawLine(img, o.x + o.width, y, o.x + o.width + 5, y, o.ink, 1);
    drawLabel(img, o.format(v), o.x + o.width + 8, y, o.ink, { scale: 1, baseline: 'middle' });
  }
  if (o.title) drawLabel(img, o.title, o.x + o.width / 2, o.y - 14, o.ink, { align: 'center', baseline: 'bottom' });
}
