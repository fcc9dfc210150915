/**
 * The side view of the set-up as an SVG picture: a vertical section through the mirror and the lens
 * with the dome, the floor, the eye-height bands, the mirror's cap, the projector and a fan of rays
 * down the middle column of the frame. Lengths are labelled in the rig's units.
 */
import { bodyCorners, DEG, EYE_BANDS, landing, pixelToRay, RAD, type LengthUnit, type MirrorModel, type RigAnalysis, type Vec3 } from '@skyfold/warp-core';
import { oklchToSrgb8, PALETTE, type Rgb8 } from './colormap.js';
import { avoidPolyline, boxesOverlap, boxHitsObstacle, placeLabel } from './label-placer.js';
import { drawScaleBar, lengthLabel } from './scales.js';
import { SvgPicture, textBox, type Box, type Picture, type TextStyle } from './svg.js';
import { FAINT, heading, INK, LABEL, NOTE, ON_MAP, PAPER } from './theme.js';

/** How the side view maps the world to the picture. */
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
  const marginX = 200;
  const top = 104;
  const scale = Math.min((width - 2 * marginX) / (2 * R), (height - top - 80) / (R - bottom));
  const cx = width / 2;
  const cy = top + R * scale;
  return { width, height, hx, hy, scale, cx, cy, bottom, X: (p) => cx + scale * (p[0] * hx + p[1] * hy), Y: (z) => cy - scale * z };
}

/**
 * Two lines right-aligned at x, the first centred on y or moved up or down in steps until neither
 * line covers a label or a kept-clear line (the first try when none is clear).
 */
function placeTwoLines(pic: SvgPicture, x: number, y: number, first: [string, TextStyle], second: [string, TextStyle]): void {
  const clear = (b: Box) => !pic.labels.some((l) => boxesOverlap(b, l.box)) && !pic.keepClear.some((o) => boxHitsObstacle(b, o));
  const layout = (dy: number) => {
    const a = textBox(first[0], x, y + dy, { ...first[1], align: 'end', baseline: 'middle' }).box;
    const b = textBox(second[0], x, a.y + a.h + 1, { ...second[1], align: 'end', baseline: 'top' }).box;
    return { dy, ok: clear(a) && clear(b) };
  };
  const tries = [0, -6, 6, -12, 12, -18, 18, -24, 24].map(layout);
  const { dy } = tries.find((t) => t.ok) ?? tries[0];
  const a = pic.text(first[0], x, y + dy, { ...first[1], align: 'end', baseline: 'middle' });
  pic.text(second[0], x, a.y + a.h + 1, { ...second[1], align: 'end', baseline: 'top' });
}

/** The eye-height bands as tinted slices of the dome, named on the left with their heights in the rig's units. */
function drawSideBands(pic: SvgPicture, f: SideFrame, R: number, floor: number, units: LengthUnit): void {
  const tints: Rgb8[] = [oklchToSrgb8(0.93, 0.04, 80), oklchToSrgb8(0.91, 0.05, 60), oklchToSrgb8(0.9, 0.05, 30)];
  const { cx, scale, Y } = f;
  EYE_BANDS.forEach((b, q) => {
    const z0 = b.from - floor;
    const z1 = b.to - floor;
    const w0 = Math.sqrt(Math.max(0, R * R - z0 * z0));
    const w1 = Math.sqrt(Math.max(0, R * R - z1 * z1));
    pic.polygon([cx - w0 * scale, Y(z0), cx + w0 * scale, Y(z0), cx + w1 * scale, Y(z1), cx - w1 * scale, Y(z1)], { fill: tints[q] });
  });
  // labels after the tints, each pair kept together: the name above, the heights below
  EYE_BANDS.forEach((b) => {
    const ym = Y((b.from + b.to) / 2 - floor);
    const x = cx - R * scale - 12;
    placeTwoLines(pic, x, ym - 7, [b.label, LABEL], [`eyes ${lengthLabel(b.from, units)} to ${lengthLabel(b.to, units)}`, NOTE]);
  });
}

/** The floor (when known), the springline, the dome's arc and its dashed continuation below. */
function drawSideDome(pic: SvgPicture, f: SideFrame, R: number, floor: number | undefined, units: LengthUnit): void {
  const { cx, scale, Y, bottom } = f;
  const fw = Math.sqrt(Math.max(0, R * R - bottom * bottom));
  if (floor !== undefined) {
    pic.rect(cx - fw * scale - 20, Y(bottom), 2 * fw * scale + 40, 6, { fill: [200, 196, 188] });
    pic.text(`floor, ${lengthLabel(floor, units)} below the springline`, cx + fw * scale - 4, Y(bottom) + 10, { ...NOTE, align: 'end', baseline: 'top' });
  }
  pic.line(cx - R * scale, Y(0), cx + R * scale, Y(0), { stroke: FAINT, width: 1, dash: [5, 5] });
  pic.keepClear.push({ kind: 'segment', x1: cx - R * scale, y1: Y(0), x2: cx + R * scale, y2: Y(0), width: 1 });
  const arc: number[] = [];
  for (let q = 0; q <= 180; q++) arc.push(cx + R * scale * Math.cos(q * DEG), Y(R * Math.sin(q * DEG)));
  pic.polyline(arc, { stroke: INK, width: 2.5 });
  avoidPolyline(pic, arc, 2.5);
  const lowA = Math.asin(Math.max(-1, bottom / R));
  for (const side of [1, -1]) {
    const pts: number[] = [];
    for (let q = 0; q <= 20; q++) {
      const t = (lowA * q) / 20;
      pts.push(cx + side * R * scale * Math.cos(t), Y(R * Math.sin(t)));
    }
    pic.polyline(pts, { stroke: INK, width: 1.5, dash: [6, 4] });
    avoidPolyline(pic, pts, 1.5);
  }
}

/** Rays in the side view: down the middle column of the frame. */
const SIDE_RAYS = 33;

function sideRayRow(q: number, H: number): number {
  return ((q + 0.5) * H) / SIDE_RAYS;
}

/** The fan of rays down the middle column of the frame, coloured by where each one's light goes. */
function drawSideRays(pic: SvgPicture, f: SideFrame, a: RigAnalysis): void {
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
      const l = landing(P, ray, dome.radius, dome.floor, dome.mesh);
      pic.line(X(P), Y(P[2]), X(l.point), Y(l.point[2]), { stroke: PALETTE.mirrorMiss, width: 1, opacity: 0.5, dash: [4, 4] });
      continue;
    }
    const M = hit.mirrorPoint;
    const l = landing(M, hit.reflected, dome.radius, dome.floor, dome.mesh);
    const inContent = hit.kind === 'dome' && (hit.fisheye[0] - 0.5) ** 2 + (hit.fisheye[1] - 0.5) ** 2 <= 0.25;
    const col = hit.kind !== 'dome' ? PALETTE.belowHorizon : inContent ? PALETTE.litDark : PALETTE.outsideContent;
    pic.line(X(M), Y(M[2]), X(l.point), Y(l.point[2]), { stroke: col, width: 1.2, opacity: 0.8 });
    pic.line(X(P), Y(P[2]), X(M), Y(M[2]), { stroke: PALETTE.beam, width: 1.5, opacity: 0.9 });
  }
}

/** The incoming beam, overdrawn in the caution colour where it runs at eye height. */
function drawSideBeamAtEyeHeight(pic: SvgPicture, f: SideFrame, a: RigAnalysis, floor: number): void {
  const tracer = a.sample.tracer;
  const [W, H] = tracer.rig.projector.resolution;
  const P = tracer.frame.origin;
  const { X, Y } = f;
  for (let q = 0; q < SIDE_RAYS; q++) {
    const hit = tracer.pixel(W / 2, sideRayRow(q, H));
    if (hit.kind === 'mirror-miss') continue;
    const M = hit.mirrorPoint;
    const dz = M[2] - P[2];
    for (const b of EYE_BANDS) {
      // the part t ∈ [t0, t1] of the segment P → M inside the band
      const z0 = b.from - floor - P[2];
      const z1 = b.to - floor - P[2];
      let t0 = 0;
      let t1 = 1;
      if (Math.abs(dz) < 1e-12) {
        if (z0 > 0 || z1 < 0) continue;
      } else {
        t0 = Math.max(0, Math.min(z0 / dz, z1 / dz));
        t1 = Math.min(1, Math.max(z0 / dz, z1 / dz));
        if (t0 >= t1) continue;
      }
      const at = (t: number) => [0, 1, 2].map((i) => P[i] + (M[i] - P[i]) * t);
      const p0 = at(t0);
      const p1 = at(t1);
      pic.line(X(p0), Y(p0[2]), X(p1), Y(p1[2]), { stroke: PALETTE.caution, width: 3, opacity: 0.9 });
    }
  }
}

/** The mirror: the whole sphere's section thin and dashed, the reflective cap thick. */
function drawSideMirror(pic: SvgPicture, f: SideFrame, m: MirrorModel): void {
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
  pic.polyline(sec, { stroke: FAINT, width: 1, opacity: 0.8, dash: [3, 3] });
  for (const c of cap) pic.polyline(c, { stroke: [70, 90, 140], width: 3.5 });
  const below = Y(C[2] - m.radius) + 8;
  placeLabel(pic, 'mirror', ON_MAP, [0, 14, 28].map((dy) => ({ x: X(C), y: below + dy, align: 'middle', baseline: 'top' })));
}

/** The projector: its body's outline if the rig gives one, else a short stub behind the lens. */
function drawSideProjector(pic: SvgPicture, f: SideFrame, a: RigAnalysis): void {
  const tracer = a.sample.tracer;
  const P = tracer.frame.origin;
  const { X, Y } = f;
  const body = tracer.rig.projector.body;
  if (body) {
    const corners = bodyCorners(body, tracer.frame).map((p) => [X(p), Y(p[2])]);
    pic.polygon(convexHull(corners).flat(), { fill: [90, 94, 104], opacity: 0.85 });
  } else {
    const fw = tracer.frame.forward;
    const back = [P[0] - 0.25 * fw[0], P[1] - 0.25 * fw[1], P[2] - 0.25 * fw[2]];
    pic.line(X(P), Y(P[2]), X(back), Y(back[2]), { stroke: [90, 94, 104], width: 10 });
  }
  pic.circle(X(P), Y(P[2]), 4, { fill: PALETTE.caution });
  const text = body ? 'projector' : 'projector (body not given)';
  placeLabel(pic, text, ON_MAP, [12, 26, 40].map((dy) => ({ x: X(P), y: Y(P[2]) + dy, align: 'middle', baseline: 'top' })));
}

/** The azimuths at the section's two ends, beside the springline. */
function drawSideEnds(pic: SvgPicture, f: SideFrame, R: number): void {
  const { cx, scale, Y, hx, hy } = f;
  const azFront = ((Math.atan2(hx, hy) * RAD) + 360) % 360;
  const style = { ...NOTE, baseline: 'middle' as const };
  pic.text(`azimuth ${azFront.toFixed(0)}°`, cx + R * scale + 10, Y(0), style);
  pic.text(`azimuth ${((azFront + 180) % 360).toFixed(0)}°`, cx - R * scale - 10, Y(0), { ...style, align: 'end' });
}

/** The title, a scale bar in the rig's units and the legend of the ray colours. */
function drawSideKey(pic: SvgPicture, f: SideFrame, units: LengthUnit): void {
  heading(pic, 'Side view of the set-up', 'Section through the mirror and the lens; rays down the middle of the frame. Beam at eye height in red.');
  drawScaleBar(pic, f.width - 24, 84, f.scale, units, 160, INK, LABEL);
  const legend: [Rgb8, string][] = [
    [PALETTE.beam, 'lens to mirror'],
    [PALETTE.litDark, 'to the content'],
    [PALETTE.belowHorizon, 'below the springline'],
    [PALETTE.mirrorMiss, 'misses the mirror'],
    [PALETTE.caution, 'beam at eye height'],
  ];
  let lx = 24;
  const ly = f.height - 24;
  for (const [c, t] of legend) {
    pic.rect(lx, ly - 2.5, 18, 5, { fill: c });
    const box = pic.text(t, lx + 24, ly, { ...LABEL, baseline: 'middle' });
    lx = box.x + box.w + 22;
  }
}

/** A side view: dome, floor, eye-height bands, mirror with its cap, projector and a fan of rays. */
export function drawSideView(a: RigAnalysis, width = 960, height = 600): Picture {
  const rig = a.sample.tracer.rig;
  const R = rig.dome.radius;
  const floor = rig.dome.floor;
  const f = sideFrame(a, width, height);
  const pic = new SvgPicture(width, height, 'side', 'Side view of the set-up', PAPER);
  drawSideKey(pic, f, rig.units);
  drawSideEnds(pic, f, R);
  if (floor !== undefined) drawSideBands(pic, f, R, floor, rig.units);
  drawSideDome(pic, f, R, floor, rig.units);
  drawSideRays(pic, f, a);
  if (floor !== undefined) drawSideBeamAtEyeHeight(pic, f, a, floor);
  drawSideMirror(pic, f, rig.mirror);
  drawSideProjector(pic, f, a);
  return pic.finish();
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
