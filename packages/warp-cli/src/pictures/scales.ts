/** Scales beside the pictures: round tick values, a colour scale, a length scale bar, and lengths as a label says them. */
import { formatLength, fromMetres, toMetres, type LengthUnit } from '@skyfold/warp-core';
import type { Rgb8 } from './colormap.js';
import type { SvgPicture, TextStyle } from './svg.js';

/** "Nice" tick values covering [lo, hi] with about `count` steps (1, 2, 2.5, 5 × 10^k). */
export function niceTicks(lo: number, hi: number, count = 5): number[] {
  if (!(hi > lo)) return [lo];
  const raw = (hi - lo) / count;
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * p).find((s) => s >= raw) ?? 10 * p;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step - 1e-9) * step; v <= hi + 1e-9 * step; v += step) out.push(Math.abs(v) < 1e-12 * step ? 0 : v);
  return out;
}

/** The step a label rounds a length to in each unit: an inch, a centimetre, a millimetre. */
const LABEL_STEP: Record<LengthUnit, number> = { ft: 1 / 12, in: 1, m: 0.01, cm: 1, mm: 1 };

/** A length for a picture label, in the rig's unit rounded to a tape's reading ("2 ft 11 in", "0.6 m", "60 cm"). */
export function lengthLabel(metres: number, unit: LengthUnit): string {
  const step = LABEL_STEP[unit];
  const v = Math.round(fromMetres(metres, unit) / step) * step;
  return formatLength(toMetres(v, unit), unit, 2).replace(/^(-?\d+ ft) 0 in$/, '$1');
}

/** Scale-bar lengths in each unit, shortest first: round values of the unit itself. */
const BAR_VALUES: Record<LengthUnit, readonly number[]> = {
  ft: [1 / 12, 2 / 12, 3 / 12, 6 / 12, 1, 2, 5, 10, 20, 50, 100],
  in: [1, 2, 5, 10, 20, 50, 100, 200, 500, 1000],
  m: [0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50],
  cm: [1, 2, 5, 10, 20, 50, 100, 200, 500, 1000, 2000],
  mm: [10, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10000],
};

/** The longest round length in `unit` whose bar is at most `maxPixels` long at `pixelsPerMetre`. */
export function scaleBarLength(pixelsPerMetre: number, unit: LengthUnit, maxPixels: number): { metres: number; label: string } {
  const values = BAR_VALUES[unit];
  let metres = toMetres(values[0], unit);
  for (const v of values) if (toMetres(v, unit) * pixelsPerMetre <= maxPixels) metres = toMetres(v, unit);
  return { metres, label: lengthLabel(metres, unit) };
}

/** A length scale bar whose right end is at (right, y): a bar with end ticks and its length above it. */
export function drawScaleBar(pic: SvgPicture, right: number, y: number, pixelsPerMetre: number, unit: LengthUnit, maxPixels: number, ink: Rgb8, style: TextStyle): void {
  const { metres, label } = scaleBarLength(pixelsPerMetre, unit, maxPixels);
  const w = metres * pixelsPerMetre;
  pic.rect(right - w, y, w, 4, { fill: ink });
  pic.line(right - w, y - 4, right - w, y + 4, { stroke: ink, width: 1 });
  pic.line(right, y - 4, right, y + 4, { stroke: ink, width: 1 });
  pic.text(label, right - w / 2, y - 6, { ...style, align: 'middle', baseline: 'bottom' });
}

export interface ColourScaleOptions {
  x: number;
  y: number;
  width: number;
  height: number;
  /** Values at the bottom and the top of the bar. */
  min: number;
  max: number;
  /** Colour for t ∈ [0, 1], bottom to top. */
  colour: (t: number) => Rgb8;
  ticks: readonly number[];
  format: (v: number) => string;
  title: string;
  ink: Rgb8;
  style: TextStyle;
}

/** A vertical colour scale with ticks and a title. */
export function drawColourScale(pic: SvgPicture, o: ColourScaleOptions): void {
  const steps = Math.max(2, Math.round(o.height / 2));
  const h = o.height / steps;
  for (let k = 0; k < steps; k++) pic.rect(o.x, o.y + k * h, o.width, h + 0.6, { fill: o.colour(1 - (k + 0.5) / steps) });
  pic.rect(o.x - 0.5, o.y - 0.5, o.width + 1, o.height + 1, { stroke: o.ink, width: 1 });
  for (const v of o.ticks) {
    const t = (v - o.min) / (o.max - o.min);
    if (!(t >= -1e-9 && t <= 1 + 1e-9)) continue;
    const y = o.y + (1 - t) * o.height;
    pic.line(o.x + o.width, y, o.x + o.width + 5, y, { stroke: o.ink, width: 1 });
    pic.text(o.format(v), o.x + o.width + 8, y, { ...o.style, baseline: 'middle' });
  }
  pic.text(o.title, o.x + o.width / 2, o.y - 10, { ...o.style, align: 'middle', baseline: 'bottom' });
}
