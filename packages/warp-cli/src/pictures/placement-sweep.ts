/**
 * The placement sweep as an SVG picture: three panels (coverage, resolution, lit share) over the
 * projector's distance from the mirror and its lens height above the floor, placements the room or the
 * bounds forbid drawn faded and crossed, the current placement ringed and the best one marked. Where the
 * mirror's height is free, a second row of the same panels over the distance and the mirror's height.
 */
import type { LengthUnit, PlacementSweep, SweepGrid, SweepPoint } from '@skyfold/warp-core';
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

/** One row of three panels: a grid over `distances` (across) and `heights` (up). */
interface PanelRow {
  grid: SweepGrid;
  heights: number[];
  current: SweepPoint;
  best: SweepPoint | null;
  /** Picture y of the row's plot top. */
  top: number;
}

const CELL_W = 22;
const CELL_H = 20;
const LEFT = 70;
const GAP = 56;

export function drawPlacementSweep(s: PlacementSweep, units: LengthUnit, marks: SweepMarks = {}): Picture {
  const cols = s.distances.length;
  const plotW = cols * CELL_W;
  const plotH = s.heights.length * CELL_H;
  const top = 112;
  const mirrorTop = top + plotH + 140;
  const mirrorH = s.mirror ? s.mirror.heights.length * CELL_H : 0;
  const width = LEFT + 3 * plotW + 2 * GAP + 24;
  const height = (s.mirror ? mirrorTop + mirrorH : top + plotH) + 80;
  const pic = new SvgPicture(width, height, 'sweep', 'Where the projector could stand', PAPER);
  heading(pic, 'Where the projector could stand', 'Each cell: the projector moved along the floor from the mirror and up or down, aimed as now; the mirror stays.');
  pic.text('Across: distance from the mirror along the floor. Up: lens height above the floor. Faded and struck through: outside the room or the bounds.', 24, 80, NOTE);
  const finite = (a: (number | null)[]) => a.filter((v): v is number => v !== null && Number.isFinite(v));
  const arc = finite([...s.arcmin, ...(s.mirror?.arcmin ?? [])]);
  const aLo = arc.length ? Math.min(...arc) : 0;
  const aHi = arc.length ? Math.max(...arc) : 1;
  const panels = (g: SweepGrid): Panel[] => [
    { title: 'coverage', values: g.coverage, t: (v) => v, format: (v) => `${Math.round(v * 100)}%`, lo: 0, hi: 1 },
    { title: 'arcmin per pixel (median)', values: g.arcmin, t: (v) => (aHi > aLo ? (aHi - v) / (aHi - aLo) : 1), format: (v) => v.toFixed(1), lo: aLo, hi: aHi },
    { title: 'pixels lit', values: g.lit, t: (v) => v, format: (v) => `${Math.round(v * 100)}%`, lo: 0, hi: 1 },
  ];
  const best = marks.best?.point ?? s.bestCell;
  drawPanelRow(pic, s.distances, { grid: s, heights: s.heights, current: s.current, best, top }, panels(s), units, true);
  const bestLabel = marks.best ? marks.best.label : 'best cell of this chart by the objective';
  pic.text(`ring: the current placement (${lengthLabel(s.current.distance, units)} from the mirror, lens ${lengthLabel(s.current.height, units)} up); cross: ${bestLabel}`, LEFT, top + plotH + 60, LABEL);
  if (s.mirror) {
    const m = s.mirror;
    pic.text("The mirror's height is free: the mirror moved up or down, the lens at its height and aimed at the same spot of the mirror.", 24, mirrorTop - 48, { ...LABEL, weight: 'bold' });
    pic.text("Across: distance from the mirror along the floor. Up: the mirror centre's height above the floor.", 24, mirrorTop - 32, NOTE);
    drawPanelRow(pic, s.distances, { grid: m, heights: m.heights, current: m.current, best: m.bestCell, top: mirrorTop }, panels(m), units, false);
    pic.text(`ring: the current rig (mirror centre ${lengthLabel(m.current.height, units)} up); cross: best cell of this row by the objective`, LEFT, mirrorTop + mirrorH + 60, LABEL);
  }
  return pic.finish();
}

/** Three panels side by side, cells faded and struck through where forbidden, ticks in the rig's units. */
function drawPanelRow(pic: SvgPicture, distances: number[], row: PanelRow, panels: Panel[], units: LengthUnit, withTitles: boolean): void {
  const { grid, heights, top } = row;
  const cols = distances.length;
  const rows = heights.length;
  const plotW = cols * CELL_W;
  const plotH = rows * CELL_H;
  const dLo = distances[0];
  const dStep = cols > 1 ? distances[1] - distances[0] : 1;
  const hLo = heights[0];
  const hStep = rows > 1 ? heights[1] - heights[0] : 1;
  // picture coordinates of a placement inside a panel whose plot starts at x0
  const at = (x0: number, p: SweepPoint) => [x0 + ((p.distance - dLo) / dStep + 0.5) * CELL_W, top + plotH - ((p.height - hLo) / hStep + 0.5) * CELL_H] as const;
  panels.forEach((panel, index) => {
    const x0 = LEFT + index * (plotW + GAP);
    pic.text(withTitles ? panel.title : `${panel.title}, by mirror height`, x0, top - 12, { ...LABEL, weight: 'bold' });
    for (let j = 0; j < rows; j++)
      for (let i = 0; i < cols; i++) {
        const k = j * cols + i;
        const v = panel.values[k];
        const x = x0 + i * CELL_W;
        const y = top + plotH - (j + 1) * CELL_H;
        if (v === null || !Number.isFinite(v)) {
          pic.rect(x, y, CELL_W, CELL_H, { fill: PALETTE.unlit });
          continue;
        }
        pic.rect(x, y, CELL_W, CELL_H, { fill: dusk(panel.t(v)), opacity: grid.allowed[k] ? 1 : 0.5 });
        if (!grid.allowed[k]) pic.line(x + 5, y + CELL_H - 5, x + CELL_W - 5, y + 5, { stroke: PALETTE.faint, width: 1, opacity: 0.8 });
      }
    pic.rect(x0, top, plotW, plotH, { fill: 'none', stroke: INK, width: 1 });
    // axes: distance below, height at the left of the first panel
    for (const d of niceTicks(distances[0], distances[cols - 1], 4)) {
      const [x] = at(x0, { distance: d, height: hLo });
      if (x < x0 || x > x0 + plotW) continue;
      pic.line(x, top + plotH, x, top + plotH + 4, { stroke: INK, width: 1 });
      pic.text(lengthLabel(d, units), x, top + plotH + 16, { ...NOTE, align: 'middle' });
    }
    if (index === 0) {
      for (const h of niceTicks(heights[0], heights[rows - 1], 4)) {
        const [, y] = at(x0, { distance: dLo, height: h });
        if (y < top || y > top + plotH) continue;
        pic.line(x0 - 4, y, x0, y, { stroke: INK, width: 1 });
        pic.text(lengthLabel(h, units), x0 - 6, y, { ...NOTE, align: 'end', baseline: 'middle' });
      }
    }
    // the current placement ringed, the best crossed
    const [cx, cy] = at(x0, row.current);
    pic.circle(cx, cy, 7, { fill: 'none', stroke: [255, 255, 255], width: 4 });
    pic.circle(cx, cy, 7, { fill: 'none', stroke: INK, width: 2 });
    if (row.best) {
      const [bx, by] = at(x0, row.best);
      for (const [w, c] of [[4, [255, 255, 255]], [2, PALETTE.caution]] as const) {
        pic.line(bx - 6, by - 6, bx + 6, by + 6, { stroke: c, width: w });
        pic.line(bx - 6, by + 6, bx + 6, by - 6, { stroke: c, width: w });
      }
    }
    pic.text(`${panel.format(panel.lo)} to ${panel.format(panel.hi)}, lighter is better`, x0, top + plotH + 34, NOTE);
  });
}
