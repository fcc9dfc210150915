/**
 * Placing labels so they overlap neither each other nor the lines they annotate. Each label comes
 * with its candidate anchors in order of preference; the first whose box is inside the picture and
 * clear of every label placed before it and of every kept-clear line wins. When none is clear the
 * least-overlapping one is taken (a test over the real pictures holds that this does not happen).
 */
import { textBox, type Box, type SvgPicture, type TextStyle } from './svg.js';

/** Something a label must not cover: a box, a line segment, or the outline of a circle (a ring). */
export type Obstacle =
  | { kind: 'box'; box: Box }
  | { kind: 'segment'; x1: number; y1: number; x2: number; y2: number; width: number }
  | { kind: 'circle'; cx: number; cy: number; r: number; width: number };

export interface Anchor {
  x: number;
  y: number;
  align?: TextStyle['align'];
  baseline?: TextStyle['baseline'];
}

export function boxesOverlap(a: Box, b: Box): boolean {
  return a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
}

function inflate(b: Box, d: number): Box {
  return { x: b.x - d, y: b.y - d, w: b.w + 2 * d, h: b.h + 2 * d };
}

/** Whether the segment meets the box (Liang–Barsky clipping of the segment to the box). */
function segmentHitsBox(b: Box, x1: number, y1: number, x2: number, y2: number): boolean {
  const dx = x2 - x1;
  const dy = y2 - y1;
  let t0 = 0;
  let t1 = 1;
  const edges: [number, number][] = [
    [-dx, x1 - b.x],
    [dx, b.x + b.w - x1],
    [-dy, y1 - b.y],
    [dy, b.y + b.h - y1],
  ];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return false; // parallel to this edge and outside it
      continue;
    }
    const t = q / p;
    if (p < 0) t0 = Math.max(t0, t);
    else t1 = Math.min(t1, t);
    if (t0 > t1) return false;
  }
  return true;
}

export function boxHitsObstacle(b: Box, o: Obstacle): boolean {
  if (o.kind === 'box') return boxesOverlap(b, o.box);
  if (o.kind === 'segment') return segmentHitsBox(inflate(b, o.width / 2), o.x1, o.y1, o.x2, o.y2);
  // a ring crosses the box when the box holds points both nearer and farther than its radius
  const nx = Math.max(b.x, Math.min(o.cx, b.x + b.w));
  const ny = Math.max(b.y, Math.min(o.cy, b.y + b.h));
  const near = Math.hypot(nx - o.cx, ny - o.cy);
  const far = Math.max(Math.hypot(b.x - o.cx, b.y - o.cy), Math.hypot(b.x + b.w - o.cx, b.y - o.cy), Math.hypot(b.x - o.cx, b.y + b.h - o.cy), Math.hypot(b.x + b.w - o.cx, b.y + b.h - o.cy));
  return near <= o.r + o.width / 2 && far >= o.r - o.width / 2;
}

/** Keeps labels off an open polyline [x0, y0, x1, y1, ...]. */
export function avoidPolyline(pic: SvgPicture, points: readonly number[], width: number): void {
  for (let k = 0; k + 3 < points.length; k += 2) pic.keepClear.push({ kind: 'segment', x1: points[k], y1: points[k + 1], x2: points[k + 2], y2: points[k + 3], width });
}

function overlapArea(a: Box, b: Box): number {
  const w = Math.min(a.x + a.w, b.x + b.w) - Math.max(a.x, b.x);
  const h = Math.min(a.y + a.h, b.y + b.h) - Math.max(a.y, b.y);
  return w > 0 && h > 0 ? w * h : 0;
}

/** How badly a box sits: 0 when it is inside the picture and clear of labels and kept-clear lines. */
function conflict(pic: SvgPicture, b: Box): number {
  let bad = 0;
  if (b.x < 0 || b.y < 0 || b.x + b.w > pic.width || b.y + b.h > pic.height) bad += 1e6;
  for (const l of pic.labels) if (boxesOverlap(b, l.box)) bad += 1e3 + overlapArea(b, l.box);
  for (const o of pic.keepClear) if (boxHitsObstacle(b, o)) bad += 10;
  return bad;
}

/**
 * Draws `text` at the first candidate anchor where it is clear (`pad` pixels of air around its box),
 * or at the least-bad one. Returns the box drawn.
 */
export function placeLabel(pic: SvgPicture, text: string, style: TextStyle, candidates: readonly Anchor[], pad = 2): Box {
  return place(pic, text, style, candidates, pad, false)!;
}

/** Like placeLabel, but leaves out a label that has no clear place (one the picture can do without). */
export function placeLabelIfClear(pic: SvgPicture, text: string, style: TextStyle, candidates: readonly Anchor[], pad = 2): Box | null {
  return place(pic, text, style, candidates, pad, true);
}

function place(pic: SvgPicture, text: string, style: TextStyle, candidates: readonly Anchor[], pad: number, onlyIfClear: boolean): Box | null {
  let best = candidates[0];
  let bestBad = Infinity;
  for (const c of candidates) {
    const s = { ...style, align: c.align ?? style.align, baseline: c.baseline ?? style.baseline };
    const b = inflate(textBox(text, c.x, c.y, s).box, pad);
    const bad = conflict(pic, b);
    if (bad < bestBad) {
      best = c;
      bestBad = bad;
      if (bad === 0) break;
    }
  }
  if (onlyIfClear && bestBad > 0) return null;
  return pic.text(text, best.x, best.y, { ...style, align: best.align ?? style.align, baseline: best.baseline ?? style.baseline });
}
