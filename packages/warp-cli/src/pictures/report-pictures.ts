/**
 * The report's pictures as RGBA rasters: fisheye maps of the dome (resolution, brightness) in the dome
 * master's orientation, the projector frame coloured by what each pixel's light does, a side view of
 * the set-up with the eye-height bands, and a plan view of where light meets eye height.
 */
import { allocGridOutput, bodyCorners, DEG, EYE_BANDS, Fate, fateOf, formatLength, HitKind, landing, type LengthUnit, type MirrorModel, pixelToRay, RAD, type RigAnalysis, Sorted, type Vec3 } from '@skyfold/warp-core';
import { drawFisheyeMap, fisheyeLookup } from './fisheye-map.js';
import type { Picture } from './svg.js';
import { oklchToSrgb8, PALETTE, type Rgb8 } from './colormap.js';
import { drawLabel, labelWidth } from './label-font.js';
import { createImage, drawLine, drawPolyline, fillCircle, fillPolygon, fillRect, setPixel, strokeCircle, strokeRect, type RasterImage } from './raster.js';
import { niceTicks } from './scales.js';

const INK = PALETTE.ink;
const FAINT = PALETTE.faint;
const PAPER = PALETTE.paper;

const FATE_COLOURS: Record<number, Rgb8> = {
  [Fate.MirrorMiss]: PALETTE.mirrorMiss,
  [Fate.Shadow]: PALETTE.shadow,
  [Fate.OutsideContent]: PALETTE.outsideContent,
  [Fate.BelowHorizon]: PALETTE.belowHorizon,
};
const FATE_LABELS: [number, string][] = [
  [Fate.Lit, 'lights the content on the dome (shaded by altitude)'],
  [Fate.OutsideContent, "on the dome, outside the content's field of view"],
  [Fate.BelowHorizon, 'below the springline: wall, floor, audience'],
  [Fate.MirrorMiss, 'misses the mirror: straight on to the back of the room'],
  [Fate.Shadow, "hidden by the projector's own body"],
];

/** The projector frame, coloured by what each pixel's light does, with altitude contours every 15°. */
export function drawFrameMap(a: RigAnalysis, width = 640): RasterImage {
  const tracer = a.sample.tracer;
  const [W, H] = tracer.rig.projector.resolution;
  const w = width;
  const h = Math.max(1, Math.round((width * H) / W));
  const xs = Float64Array.from({ length: w }, (_, i) => ((i + 0.5) * W) / w);
  const ys = Float64Array.from({ length: h }, (_, j) => ((j + 0.5) * H) / h);
  const g = tracer.grid(xs, ys, allocGridOutput(w, h, { points: true, mirrorDistance: true }));
  const fate = new Uint8Array(w * h);
  const alt = new Float64Array(w * h).fill(Number.NaN);
  const P = tracer.frame.origin;
  const e = tracer.rig.content.eye;
  const ray: Vec3 = [0, 0, 0];
  for (let j = 0; j < h; j++)
    for (let i = 0; i < w; i++) {
      const k = j * w + i;
      if (g.kind[k] === HitKind.MirrorMiss) continue;
      pixelToRay(ray, tracer.frame, xs[i], ys[j]);
      const t = g.mirrorDistance![k];
      const X: Vec3 = [P[0] + t * ray[0], P[1] + t * ray[1], P[2] + t * ray[2]];
      const D: Vec3 = [g.point![3 * k], g.point![3 * k + 1], g.point![3 * k + 2]];
      fate[k] = fateOf(tracer, g.kind[k], g.u[k], g.v[k], X, D);
      const dx = D[0] - e[0], dy = D[1] - e[1], dz = D[2] - e[2];
      alt[k] = Math.asin(Math.max(-1, Math.min(1, dz / Math.hypot(dx, dy, dz)))) * RAD;
    }
  const shades: Rgb8[] = Array.from({ length: 19 }, (_, q) => oklchToSrgb8(0.5 + (0.38 * q) / 18, 0.1, 175 - q * 2));
  const left = 40;
  const top = 86;
  const legendH = 30 + FATE_LABELS.length * 22;
  const img = createImage(w + 2 * left, top + h + legendH + 20, PAPER);
  for (let j = 0; j < h; j++)
    for (let i = 0; i < w; i++) {
      const k = j * w + i;
      const f = fate[k];
      const col = f === Fate.Lit ? shades[Math.max(0, Math.min(18, Math.round(alt[k] / 5)))] : FATE_COLOURS[f];
      setPixel(img, left + i, top + j, col);
    }
  // contours where the 15° altitude band changes between neighbours on the dome
  const band = (k: number) => (fate[k] === Fate.Lit || fate[k] === Fate.OutsideContent || fate[k] === Fate.Shadow ? Math.floor(alt[k] / 15) : -99);
  for (let j = 0; j < h - 1; j++)
    for (let i = 0; i < w - 1; i++) {
      const k = j * w + i;
      const b = band(k);
      if (b === -99) continue;
      const br = band(k + 1);
      const bd = band(k + w);
      if ((br !== -99 && br !== b) || (bd !== -99 && bd !== b)) setPixel(img, left + i, top + j, PALETTE.litDark);
    }
  // label the contours down the middle column of the lit region
  const placed: number[] = [];
  for (const col of [Math.round(w / 2), Math.round(w * 0.3), Math.round(w * 0.7)]) {
    for (let j = 1; j < h; j++) {
      const k = j * w + col;
      const b0 = band(k - w);
      const b1 = band(k);
      if (b0 === -99 || b1 === -99 || b0 === b1) continue;
      const level = Math.max(b0, b1) * 15;
      if (placed.includes(level)) continue;
      placed.push(level);
      drawLabel(img, `${level}°`, left + col + 4, top + j, INK, { baseline: 'middle', halo: [255, 255, 255] });
    }
  }
  strokeRect(img, left - 1, top - 1, w + 2, h + 2, INK);
  drawLabel(img, 'What each projector pixel lights', 24, 22, INK, { scale: 2 });
  drawLabel(img, `The projector frame (${W} x ${H}) as the projector shows it; lines: altitude on the dome every 15°.`, 24, 52, FAINT);
  const shares = a.figures.pixels;
  const pct: Record<number, number | null> = {
    [Fate.Lit]: shares.lit,
    [Fate.OutsideContent]: shares.outsideContent,
    [Fate.BelowHorizon]: shares.belowHorizon,
    [Fate.MirrorMiss]: shares.mirrorMiss,
    [Fate.Shadow]: shares.shadow,
  };
  let ly = top + h + 24;
  for (const [f, label] of FATE_LABELS) {
    if (f === Fate.Shadow && !tracer.rig.projector.body) continue;
    fillRect(img, left, ly, 16, 16, f === Fate.Lit ? shades[9] : FATE_COLOURS[f]);
    strokeRect(img, left, ly, 16, 16, FAINT);
    const p = pct[f];
    drawLabel(img, `${p === null ? '-' : (p * 100).toFixed(1).padStart(5)}%  ${label}`, left + 26, ly + 4, INK);
    ly += 22;
  }
  return img;
}

/** How the side view maps the world to the picture: a vertical section through the mirror and the lens. */
interface SideFrame {
  width: number;
  height: number;
  /** Unit horizontal direction of the section, from the mirror toward the projector. */
  hx: number;
  hy: number;
  /** Picture pixels per metre, and the picture position of the dome's centre. */
  scale: number;
  cx: number;
  cy: number;
  /** The lowest height drawn: the floor, or a quarter radius below the springline. */
  bottom: number;
  X: (p: readonly number[]) => number;
  Y: (z: number) => number;
}

function sideFrame(a: RigAnalysis, width: number, height: number): SideFrame {
  const rig = a.sample.tracer.rig;
  const R = rig.dome.radius;
  const P = a.sample.tracer.frame.origin;
  const C = rig.mirror.center;
  // the horizontal axis runs from the mirror toward the projector, so the beam lies in the picture
  let hx = P[0] - C[0];
  let hy = P[1] - C[1];
  let hl = Math.hypot(hx, hy);
  if (hl < 1e-6) {
    hx = 0;
    hy = 1;
    hl = 1;
  }
  hx /= hl;
  hy /= hl;
  const bottom = -(rig.dome.floor ?? 0.25 * R);
  const marginX = 190;
  const top = 100;
  const scale = Math.min((width - 2 * marginX) / (2 * R), (height - top - 70) / (R - bottom));
  const cx = width / 2;
  const cy = top + R * scale;
  return { width, height, hx, hy, scale, cx, cy, bottom, X: (p) => cx + scale * (p[0] * hx + p[1] * hy), Y: (z) => cy - scale * z };
}

/** The eye-height bands as tinted slices of the dome, labelled on the left. */
function drawSideBands(img: RasterImage, f: SideFrame, R: number, floor: number): void {
  const tints: Rgb8[] = [oklchToSrgb8(0.93, 0.04, 80), oklchToSrgb8(0.91, 0.05, 60), oklchToSrgb8(0.9, 0.05, 30)];
  const { cx, scale, Y } = f;
  EYE_BANDS.forEach((b, q) => {
    const z0 = b.from - floor;
    const z1 = b.to - floor;
    const w0 = Math.sqrt(Math.max(0, R * R - z0 * z0));
    const w1 = Math.sqrt(Math.max(0, R * R - z1 * z1));
    fillPolygon(img, [cx - w0 * scale, Y(z0), cx + w0 * scale, Y(z0), cx + w1 * scale, Y(z1), cx - w1 * scale, Y(z1)], tints[q]);
    drawLabel(img, `${b.label}`, cx - R * scale - 10, Y((z0 + z1) / 2) - 6, INK, { align: 'right', baseline: 'middle' });
    drawLabel(img, `eyes ${b.from}-${b.to} m`, cx - R * scale - 10, Y((z0 + z1) / 2) + 7, FAINT, { align: 'right', baseline: 'middle' });
  });
}

/** The floor (when known), the springline, the dome's arc and its dashed continuation below. */
function drawSideDome(img: RasterImage, f: SideFrame, R: number, floor: number | undefined, units: LengthUnit): void {
  const { cx, scale, Y, bottom } = f;
  const fw = Math.sqrt(Math.max(0, R * R - bottom * bottom));
  if (floor !== undefined) {
    fillRect(img, cx - fw * scale - 20, Y(bottom), 2 * fw * scale + 40, 6, [200, 196, 188]);
    drawLabel(img, `floor, ${formatLength(floor, units, 2)} below the springline`, cx + fw * scale - 4, Y(bottom) + 12, FAINT, { align: 'right' });
  }
  drawLine(img, cx - R * scale, Y(0), cx + R * scale, Y(0), FAINT, 1, 1, [5, 5]);
  const arc: number[] = [];
  for (let q = 0; q <= 180; q++) arc.push(cx + R * scale * Math.cos(q * DEG), Y(R * Math.sin(q * DEG)));
  drawPolyline(img, arc, INK, 2.5);
  const lowA = Math.asin(Math.max(-1, bottom / R));
  for (const side of [1, -1]) {
    const pts: number[] = [];
    for (let q = 0; q <= 20; q++) {
      const t = (lowA * q) / 20;
      pts.push(cx + side * R * scale * Math.cos(t), Y(R * Math.sin(t)));
    }
    drawPolyline(img, pts, INK, 1.5, 1, [6, 4]);
  }
}

/** Rays in the side view: down the middle column of the frame. */
const SIDE_RAYS = 33;

function sideRayRow(q: number, H: number): number {
  return ((q + 0.5) * H) / SIDE_RAYS;
}

/** The fan of rays down the middle column of the frame, coloured by where each one's light goes. */
function drawSideRays(img: RasterImage, f: SideFrame, a: RigAnalysis): void {
  const tracer = a.sample.tracer;
  const { dome, projector } = tracer.rig;
  const [W, H] = projector.resolution;
  const P = tracer.frame.origin;
  const { X, Y } = f;
  const ray: Vec3 = [0, 0, 0];
  for (let q = 0; q < SIDE_RAYS; q++) {
    const y = sideRayRow(q, H);
    const hit = tracer.pixel(W / 2, y);
    pixelToRay(ray, tracer.frame, W / 2, y);
    if (hit.kind === 'mirror-miss') {
      const l = landing(P, ray, dome.radius, dome.floor);
      drawLine(img, X(P), Y(P[2]), X(l.point), Y(l.point[2]), PALETTE.mirrorMiss, 1, 0.5, [4, 4]);
      continue;
    }
    const M = hit.mirrorPoint;
    const l = landing(M, hit.reflected, dome.radius, dome.floor);
    const inContent = hit.kind === 'dome' && (hit.fisheye[0] - 0.5) ** 2 + (hit.fisheye[1] - 0.5) ** 2 <= 0.25;
    const col = hit.kind !== 'dome' ? PALETTE.belowHorizon : inContent ? PALETTE.litDark : PALETTE.outsideContent;
    drawLine(img, X(M), Y(M[2]), X(l.point), Y(l.point[2]), col, 1.2, 0.8);
    drawLine(img, X(P), Y(P[2]), X(M), Y(M[2]), PALETTE.beam, 1.5, 0.9);
  }
}

/** The incoming beam, overdrawn in the caution colour where it runs at eye height. */
function drawSideBeamAtEyeHeight(img: RasterImage, f: SideFrame, a: RigAnalysis, floor: number): void {
  const tracer = a.sample.tracer;
  const [W, H] = tracer.rig.projector.resolution;
  const P = tracer.frame.origin;
  const { X, Y } = f;
  const steps = 60;
  for (let q = 0; q < SIDE_RAYS; q++) {
    const hit = tracer.pixel(W / 2, sideRayRow(q, H));
    if (hit.kind === 'mirror-miss') continue;
    const M = hit.mirrorPoint;
    for (const b of EYE_BANDS) {
      const z0 = b.from - floor;
      const z1 = b.to - floor;
      for (let s = 0; s < steps; s++) {
        const p0 = [0, 1, 2].map((i) => P[i] + ((M[i] - P[i]) * s) / steps);
        const p1 = [0, 1, 2].map((i) => P[i] + ((M[i] - P[i]) * (s + 1)) / steps);
        const zm = (p0[2] + p1[2]) / 2;
        if (zm >= z0 && zm <= z1) drawLine(img, X(p0), Y(p0[2]), X(p1), Y(p1[2]), PALETTE.caution, 3, 0.9);
      }
    }
  }
}

/** The mirror: the whole sphere's section thin and dashed, the reflective cap thick. */
function drawSideMirror(img: RasterImage, f: SideFrame, m: MirrorModel): void {
  const { X, Y, hx, hy } = f;
  const C = m.center;
  const sec: number[] = [];
  const cap: number[][] = [];
  let run: number[] = [];
  for (let q = 0; q <= 360; q++) {
    const t = q * DEG;
    const p = [C[0] + m.radius * Math.cos(t) * hx, C[1] + m.radius * Math.cos(t) * hy, C[2] + m.radius * Math.sin(t)];
    sec.push(X(p), Y(p[2]));
    const onCap = (p[0] - C[0]) * m.axis[0] + (p[1] - C[1]) * m.axis[1] + (p[2] - C[2]) * m.axis[2] >= m.radius * Math.cos(m.capAngle) - 1e-9;
    if (onCap) run.push(X(p), Y(p[2]));
    else if (run.length) {
      cap.push(run);
      run = [];
    }
  }
  if (run.length) cap.push(run);
  drawPolyline(img, sec, FAINT, 1, 0.8, [3, 3]);
  for (const c of cap) drawPolyline(img, c, [70, 90, 140], 3.5);
  drawLabel(img, 'mirror', X(C), Y(C[2] - m.radius) + 10, INK, { align: 'center', halo: PAPER });
}

/** The projector: its body's outline if the rig gives one, else a short stub behind the lens. */
function drawSideProjector(img: RasterImage, f: SideFrame, a: RigAnalysis): void {
  const tracer = a.sample.tracer;
  const P = tracer.frame.origin;
  const { X, Y } = f;
  const body = tracer.rig.projector.body;
  if (body) {
    const corners = bodyCorners(body, tracer.frame).map((p) => [X(p), Y(p[2])]);
    fillPolygon(img, convexHull(corners).flat(), [90, 94, 104], 0.85);
  } else {
    const fw = tracer.frame.forward;
    const back = [P[0] - 0.25 * fw[0], P[1] - 0.25 * fw[1], P[2] - 0.25 * fw[2]];
    drawLine(img, X(P), Y(P[2]), X(back), Y(back[2]), [90, 94, 104], 10);
  }
  fillCircle(img, X(P), Y(P[2]), 4, PALETTE.caution);
  drawLabel(img, body ? 'projector' : 'projector (body not given)', X(P), Y(P[2]) + 14, INK, { align: 'center', halo: PAPER });
}

/** The azimuths at the section's two ends, a one-metre scale bar, the title and the legend. */
function drawSideAnnotations(img: RasterImage, f: SideFrame, R: number, units: LengthUnit): void {
  const { cx, scale, Y, hx, hy, width, height } = f;
  const azFront = ((Math.atan2(hx, hy) * RAD) + 360) % 360;
  drawLabel(img, `azimuth ${azFront.toFixed(0)}°`, cx + R * scale + 10, Y(0), FAINT, { baseline: 'middle' });
  drawLabel(img, `azimuth ${((azFront + 180) % 360).toFixed(0)}°`, cx - R * scale - 10, Y(0), FAINT, { align: 'right', baseline: 'middle' });
  const sbx = width - 40 - scale;
  const sby = height - 26;
  fillRect(img, sbx, sby, scale, 4, INK);
  drawLabel(img, units === 'ft' || units === 'in' ? `1 m = ${formatLength(1, units)}` : '1 m', sbx + scale / 2, sby - 14, INK, { align: 'center' });
  drawLabel(img, 'Side view of the set-up', 24, 22, INK, { scale: 2 });
  drawLabel(img, 'Section through the mirror and the lens; rays down the middle of the frame. Beam at eye height in red.', 24, 52, FAINT);
  const legend: [Rgb8, string][] = [
    [PALETTE.beam, 'lens to mirror'],
    [PALETTE.litDark, 'to the content'],
    [PALETTE.belowHorizon, 'below the springline'],
    [PALETTE.mirrorMiss, 'misses the mirror'],
    [PALETTE.caution, 'beam at eye height'],
  ];
  let lx = 24;
  for (const [c, t] of legend) {
    fillRect(img, lx, height - 28, 18, 5, c);
    drawLabel(img, t, lx + 24, height - 30, INK);
    lx += 24 + labelWidth(t) + 22;
  }
}

/** A side view: dome, floor, eye-height bands, mirror with its cap, projector and a fan of rays. */
export function drawSideView(a: RigAnalysis, width = 960, height = 600): RasterImage {
  const rig = a.sample.tracer.rig;
  const R = rig.dome.radius;
  const floor = rig.dome.floor;
  const f = sideFrame(a, width, height);
  const img = createImage(width, height, PAPER);
  if (floor !== undefined) drawSideBands(img, f, R, floor);
  drawSideDome(img, f, R, floor, rig.units);
  drawSideRays(img, f, a);
  if (floor !== undefined) drawSideBeamAtEyeHeight(img, f, a, floor);
  drawSideMirror(img, f, rig.mirror);
  drawSideProjector(img, f, a);
  drawSideAnnotations(img, f, R, rig.units);
  return img;
}

function convexHull(pts: number[][]): number[][] {
  const p = [...pts].sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  const cross = (o: number[], a: number[], b: number[]) => (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
  const lower: number[][] = [];
  for (const q of p) {
    while (lower.length >= 2 && cross(lower[lower.length - 2], lower[lower.length - 1], q) <= 0) lower.pop();
    lower.push(q);
  }
  const upper: number[][] = [];
  for (const q of [...p].reverse()) {
    while (upper.length >= 2 && cross(upper[upper.length - 2], upper[upper.length - 1], q) <= 0) upper.pop();
    upper.push(q);
  }
  return [...lower.slice(0, -1), ...upper.slice(0, -1)];
}

/** Plan views, one per eye-height band: where the direct beam and the reflected light cross it. */
export function drawSafetyPlan(a: RigAnalysis, panel = 300): RasterImage | null {
  const z = a.safetyZones;
  const rig = a.sample.tracer.rig;
  if (!z || rig.dome.floor === undefined) return null;
  const gap = 24;
  const img = createImage(3 * panel + 4 * gap, panel + 180, PAPER);
  const R = rig.dome.radius;
  const floor = rig.dome.floor;
  const P = a.sample.tracer.frame.origin;
  const C = rig.mirror.center;
  const reflectedTint = oklchToSrgb8(0.86, 0.09, 75);
  EYE_BANDS.forEach((b, q) => {
    const ox = gap + q * (panel + gap);
    const oy = 96;
    const s = panel / (2 * R);
    const cell = panel / z.n;
    const zMid = (b.from + b.to) / 2 - floor;
    const wallR = Math.sqrt(Math.max(0, R * R - zMid * zMid));
    for (let j = 0; j < z.n; j++)
      for (let i = 0; i < z.n; i++) {
        const x = -R + ((i + 0.5) * 2 * R) / z.n;
        const y = R - ((j + 0.5) * 2 * R) / z.n;
        if (Math.hypot(x, y) > wallR) continue;
        const k = j * z.n + i;
        const col: Rgb8 = z.direct[q][k] ? PALETTE.caution : z.reflected[q][k] ? reflectedTint : [238, 240, 242];
        fillRect(img, ox + i * cell, oy + j * cell, Math.ceil(cell), Math.ceil(cell), col);
      }
    // plan: x to the right, +y (front) up
    strokeCircle(img, ox + panel / 2, oy + panel / 2, wallR * s, INK, 1.5);
    fillCircle(img, ox + panel / 2 + C[0] * s, oy + panel / 2 - C[1] * s, Math.max(3, rig.mirror.radius * s), [70, 90, 140]);
    fillCircle(img, ox + panel / 2 + P[0] * s, oy + panel / 2 - P[1] * s, 4, INK);
    drawLabel(img, 'front', ox + panel / 2, oy - 14, FAINT, { align: 'center' });
    drawLabel(img, `${b.label}`, ox, oy + panel + 14, INK);
    drawLabel(img, `eyes ${b.from}-${b.to} m above the floor`, ox, oy + panel + 30, FAINT);
  });
  drawLabel(img, 'Where light meets eye height (plan view)', 24, 22, INK, { scale: 2 });
  drawLabel(img, 'Seen from above, front at the top. Dot: lens; blue disc: mirror.', 24, 52, FAINT);
  const ly = panel + 96 + 54;
  fillRect(img, 24, ly, 16, 12, PALETTE.caution);
  drawLabel(img, 'the beam itself (lens to mirror, or past it)', 48, ly + 2, INK);
  fillRect(img, 24 + 360, ly, 16, 12, reflectedTint);
  drawLabel(img, 'reflected light (the picture)', 48 + 360, ly + 2, INK);
  return img;
}

/** Colour-scale limits for the resolution map: nice numbers around the 1st and 99th percentiles. */
export function resolutionScale(arcmin: Float64Array): { min: number; max: number } {
  const s = new Sorted(arcmin);
  const lo = s.q(0.01);
  const hi = s.q(0.99);
  const t = niceTicks(lo, hi, 5);
  const step = t.length > 1 ? t[1] - t[0] : 1;
  return { min: Math.floor(lo / step) * step, max: Math.ceil(hi / step) * step };
}

/** Relative brightness before compensation per cell: (smallest lit area) ÷ area, 1 = brightest. */
export function relativeBrightness(a: RigAnalysis): Float64Array {
  const A = new Sorted(a.cells.areaPerPixel);
  const aMin = A.q(0.01);
  return Float64Array.from(a.cells.areaPerPixel, (x) => (Number.isFinite(x) ? Math.min(1, aMin / x) : Number.NaN));
}

export interface ReportPictures {
  resolution: Picture;
  brightness: Picture;
  frame: RasterImage;
  side: RasterImage;
  plan: RasterImage | null;
}

/** All the report's pictures; `fisheyeSize` is the fisheye disc's diameter in pixels. */
export async function reportPictures(a: RigAnalysis, fisheyeSize = 420): Promise<ReportPictures> {
  const lookup = fisheyeLookup(a, fisheyeSize);
  const rs = resolutionScale(a.arcmin);
  const resolution = await drawFisheyeMap(a, lookup, a.arcmin, {
    title: 'Resolution on the dome',
    subtitle: 'Arcminutes per projector pixel, seen from the eye point. Lighter is sharper.',
    scaleTitle: 'arcmin/px',
    min: rs.min,
    max: rs.max,
    format: (v) => (Number.isInteger(v) ? String(v) : v.toFixed(1)),
    reverse: true,
  }, 'resolution');
  const brightness = await drawFisheyeMap(a, lookup, relativeBrightness(a), {
    title: 'Brightness before compensation',
    subtitle: 'Relative brightness of the lit dome, 1 = brightest. The mesh evens it out by dimming.',
    scaleTitle: 'relative',
    min: 0,
    max: 1,
    format: (v) => v.toFixed(1),
  }, 'brightness');
  return { resolution, brightness, frame: drawFrameMap(a), side: drawSideView(a), plan: drawSafetyPlan(a) };
}
