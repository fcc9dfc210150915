/**
 * The report's pictures: fisheye maps of the dome (resolution, brightness) in the dome master's
 * orientation, the projector frame coloured by what each pixel's light does (a raster), a side view of
 * the set-up with the eye-height bands (side-view.ts), and a plan view of where light meets eye height
 * (safety-plan.ts).
 */
import { allocGridOutput, classifyHit, HitKind, pixelToRay, RAD, type RigAnalysis, Sorted, type Vec3 } from '@skyfold/warp-core';
import { drawFisheyeMap, fisheyeLookup } from './fisheye-map.js';
import type { Picture } from './svg.js';
import { oklchToSrgb8, PALETTE, type Rgb8 } from './colormap.js';
import { drawLabel } from './label-font.js';
import { createImage, fillRect, setPixel, strokeRect, type RasterImage } from './raster.js';
import { niceTicks } from './scales.js';
import { drawSafetyPlan } from './safety-plan.js';
import { drawSideView } from './side-view.js';

const INK = PALETTE.ink;
const FAINT = PALETTE.faint;
const PAPER = PALETTE.paper;

const KIND_COLOURS: Record<number, Rgb8> = {
  [HitKind.MirrorMiss]: PALETTE.mirrorMiss,
  [HitKind.Shadow]: PALETTE.shadow,
  [HitKind.OutsideContent]: PALETTE.outsideContent,
  [HitKind.BelowHorizon]: PALETTE.belowHorizon,
};
const KIND_LABELS: [number, string][] = [
  [HitKind.Lit, 'lights the content on the dome (shaded by altitude)'],
  [HitKind.OutsideContent, "on the dome, outside the content's field of view"],
  [HitKind.BelowHorizon, 'below the springline: wall, floor, audience'],
  [HitKind.MirrorMiss, 'misses the mirror: straight on to the back of the room'],
  [HitKind.Shadow, "hidden by the projector's own body"],
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
  const kinds = new Uint8Array(w * h);
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
      kinds[k] = classifyHit(tracer, g.kind[k], g.u[k], g.v[k], X, D);
      const dx = D[0] - e[0], dy = D[1] - e[1], dz = D[2] - e[2];
      alt[k] = Math.asin(Math.max(-1, Math.min(1, dz / Math.hypot(dx, dy, dz)))) * RAD;
    }
  const shades: Rgb8[] = Array.from({ length: 19 }, (_, q) => oklchToSrgb8(0.5 + (0.38 * q) / 18, 0.1, 175 - q * 2));
  const left = 40;
  const top = 86;
  const legendH = 30 + KIND_LABELS.length * 22;
  const img = createImage(w + 2 * left, top + h + legendH + 20, PAPER);
  for (let j = 0; j < h; j++)
    for (let i = 0; i < w; i++) {
      const k = j * w + i;
      const f = kinds[k];
      const col = f === HitKind.Lit ? shades[Math.max(0, Math.min(18, Math.round(alt[k] / 5)))] : KIND_COLOURS[f];
      setPixel(img, left + i, top + j, col);
    }
  // contours where the 15° altitude band changes between neighbours on the dome
  const band = (k: number) => (kinds[k] === HitKind.Lit || kinds[k] === HitKind.OutsideContent || kinds[k] === HitKind.Shadow ? Math.floor(alt[k] / 15) : -99);
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
    [HitKind.Lit]: shares.lit,
    [HitKind.OutsideContent]: shares.outsideContent,
    [HitKind.BelowHorizon]: shares.belowHorizon,
    [HitKind.MirrorMiss]: shares.mirrorMiss,
    [HitKind.Shadow]: shares.shadow,
  };
  let ly = top + h + 24;
  for (const [f, label] of KIND_LABELS) {
    if (f === HitKind.Shadow && !tracer.rig.projector.body) continue;
    fillRect(img, left, ly, 16, 16, f === HitKind.Lit ? shades[9] : KIND_COLOURS[f]);
    strokeRect(img, left, ly, 16, 16, FAINT);
    const p = pct[f];
    drawLabel(img, `${p === null ? '-' : (p * 100).toFixed(1).padStart(5)}%  ${label}`, left + 26, ly + 4, INK);
    ly += 22;
  }
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
  side: Picture;
  plan: Picture | null;
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
  return { resolution, brightness, frame: drawFrameMap(a), side: drawSideView(a), plan: await drawSafetyPlan(a) };
}
