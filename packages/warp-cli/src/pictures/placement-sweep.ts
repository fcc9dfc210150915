/**
 * The placement sweep as an SVG picture: three panels (coverage, resolution, lit share) over the
 * projector's distance from the mirror and its lens height above the floor, placements the room or the
 * bounds forbid drawn faded and crossed, the current placement ringed and the best one marked.
 */
import type { LengthUnit, PlacementSweep, SweepPoint } from '@skyfold/warp-core';
import { dusk, PALETTE } from './colormap.js';
import { lengthLabel, niceTicks } from './scales.js';
import { SvgPicture, type Picture } from './svg.js';
import { heading, INK, LABEL, NOTE, PAPER } from './theme.js';

interface Panel {
  title: string;
  values: (number | null)[];
  /** Colour position of a value, 0 (dark, worse) to 1 (light, better). */
  t: (v: number) => number;
  format: (v: number) => string;
  lo: number;
  hi: number;
}

export interface SweepMarks {
  /** The best placement to mark, and its label. */
  best?: { point: SweepPoint; label: string } | null;
}

export function drawPlacementSweep(s: PlacementSweep, units: LengthUnit, marks: SweepMarks = {}): Picture {
  const cellW = 22;
  const cellH = 20;
  const cols = s.distances.length;
  const rows = s.heights.length;
  const plotW = cols * cellW;
  const plotH = rows * cellH;
  const left = 70;
  const gap = 56;
  const top = 112;
  const width = left + 3 * plotW + 2 * gap + 24;
  const height = top + plotH + 80;
  const pic = new SvgPicture(width, height, 'sweep', 'Where the projector could stand', PAPER);
  heading(pic, 'Where the projector could stand', 'Each cell: the projector moved along the floor from the mirror and up or down, aimed as now; the mirror stays.');
  pic.text('Across: distance from the mirror along the floor. Up: lens height above the floor. Faded and struck through: outside the room or the bounds.', 24, 80, NOTE);
  const finite = (a: (number | null)[]) => a.filter((v): v is number => v !== null && Number.isFinite(v));
  const arc = finite(s.arcmin);
  const aLo = arc.length ? Math.min(...arc) : 0;
  const aHi = arc.length ? Math.max(...arc) : 1;
  const panels: Panel[] = [
    { title: 'coverage', values: s.coverage, t: (v) => v, format: (v) => `${Math.round(v * 100)}%`, lo: 0, hi: 1 },
    { title: 'arcmin per pixel (median)', values: s.arcmin, t: (v) => (aHi > aLo ? (aHi - v) / (aHi - aLo) : 1), format: (v) => v.toFixed(1), lo: aLo, hi: aHi },
    { title: 'pixels lit', values: s.lit, t: (v) => v, format: (v) => `${Math.round(v * 100)}%`, lo: 0, hi: 1 },
  ];
  const dLo = s.distances[0];
  const dStep = cols > 1 ? s.distances[1] - s.distances[0] : 1;
  const hLo = s.heights[0];
  const hStep = rows > 1 ? s.heights[1] - s.heights[0] : 1;
  // picture coordinates of a placement inside a panel whose plot starts at x0
  const at = (x0: number, p: SweepPoint) => [x0 + ((p.distance - dLo) / dStep + 0.5) * cellW, top + plotH - ((p.height - hLo) / hStep + 0.5) * cellH] as const;
  panels.forEach((panel, index) => {
    const x0 = left + index * (plotW + gap);
    pic.text(panel.title, x0, top - 12, { ...LABEL, weight: 'bold' });
    for (let j = 0; j < rows; j++)
      for (let i = 0; i < cols; i++) {
        const k = j * cols + i;
        const v = panel.values[k];
        const x = x0 + i * cellW;
        const y = top + plotH - (j + 1) * cellH;
        if (v === null || !Number.isFinite(v)) {
          pic.rect(x, y, cellW, cellH, { fill: PALETTE.unlit });
          continue;
        }
        pic.rect(x, y, cellW, cellH, { fill: dusk(panel.t(v)), opacity: s.allowed[k] ? 1 : 0.5 });
        if (!s.allowed[k]) pic.line(x + 5, y + cellH - 5, x + cellW - 5, y + 5, { stroke: PALETTE.faint, width: 1, opacity: 0.8 });
      }
    pic.rect(x0, top, plotW, plotH, { fill: 'none', stroke: INK, width: 1 });
    // axes: distance below, height at the left of the first panel
    for (const d of niceTicks(s.distances[0], s.distances[cols - 1], 4)) {
      const [x] = at(x0, { distance: d, height: hLo });
      if (x < x0 || x > x0 + plotW) continue;
      pic.line(x, top + plotH, x, top + plotH + 4, { stroke: INK, width: 1 });
      pic.text(lengthLabel(d, units), x, top + plotH + 16, { ...NOTE, align: 'middle' });
    }
    if (index === 0) {
      for (const h of niceTicks(s.heights[0], s.heights[rows - 1], 4)) {
        const [, y] = at(x0, { distance: dLo, height: h });
        if (y < top || y > top + plotH) continue;
        pic.line(x0 - 4, y, x0, y, { stroke: INK, width: 1 });
        pic.text(lengthLabel(h, units), x0 - 6, y, { ...NOTE, align: 'end', baseline: 'middle' });
      }
    }
    // the current placement ringed, the best crossed
    const [cx, cy] = at(x0, s.current);
    pic.circle(cx, cy, 7, { fill: 'none', stroke: [255, 255, 255], width: 4 });
    pic.circle(cx, cy, 7, { fill: 'none', stroke: INK, width: 2 });
    const best = marks.best?.point ?? s.bestCell;
    if (best) {
      const [bx, by] = at(x0, best);
      for (const [w, c] of [[4, [255, 255, 255]], [2, PALETTE.caution]] as const) {
        pic.line(bx - 6, by - 6, bx + 6, by + 6, { stroke: c, width: w });
        pic.line(bx - 6, by + 6, bx + 6, by - 6, { stroke: c, width: w });
      }
    }
    pic.text(`${panel.format(panel.lo)} to ${panel.format(panel.hi)}, lighter is better`, x0, top + plotH + 34, NOTE);
  });
  const bestLabel = marks.best ? marks.best.label : 'best cell of this chart by the objective';
  pic.text(`ring: the current placement (${lengthLabel(s.current.distance, units)} from the mirror, lens ${lengthLabel(s.current.height, units)} up); cross: ${bestLabel}`, left, top + plotH + 60, LABEL);
  return pic.finish();
}
