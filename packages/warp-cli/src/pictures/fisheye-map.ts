/**
 * Fisheye maps of the dome in the dome master's orientation (front at the bottom, right at the
 * right): a per-cell figure (resolution, brightness) coloured per pixel and embedded as a raster,
 * with the altitude rings, azimuth spokes, labels and colour scale drawn as vectors.
 */
import { azAltFromDirection, contentToWorld, DEG, domePointSeen, fisheyeToDirection, locateDirection, segmentHitsBody, type RigAnalysis, type Vec3 } from '@skyfold/warp-core';
import { dusk, PALETTE, type Rgb8 } from './colormap.js';
import { placeLabel, placeLabelIfClear, type Anchor } from './label-placer.js';
import { rasterDataUri } from './render.js';
import { drawColourScale, niceTicks } from './scales.js';
import { SvgPicture, textBox, type Picture } from './svg.js';
import { FAINT, heading, INK, LABEL, NOTE, ON_MAP, PAPER } from './theme.js';

/** Which report cell lights each pixel of a size × size fisheye picture: ≥ 0 a cell, −1 unlit dome, −2 outside the content, −3 below the springline. */
export interface FisheyeLookup {
  size: number;
  cell: Int32Array;
}

export function fisheyeLookup(a: RigAnalysis, size: number): FisheyeLookup {
  const s = a.sample;
  const tracer = s.tracer;
  const rig = tracer.rig;
  const body = rig.projector.body;
  const cell = new Int32Array(size * size);
  const w: Vec3 = [0, 0, 0];
  const nc = s.cols - 1;
  for (let j = 0; j < size; j++) {
    for (let i = 0; i < size; i++) {
      const k = j * size + i;
      const u = (i + 0.5) / size;
      const v = (j + 0.5) / size;
      if ((u - 0.5) ** 2 + (v - 0.5) ** 2 > 0.25) {
        cell[k] = -2;
        continue;
      }
      contentToWorld(w, fisheyeToDirection(w, u, v, rig.content.fov), rig.content.azimuth ?? 0);
      const seen = domePointSeen(tracer, w);
      if (seen === null || seen[2] < 0) {
        cell[k] = -3;
        continue;
      }
      const [az, alt] = azAltFromDirection(w);
      const hit = locateDirection(tracer, az, alt, 1e-7);
      if (hit.pixel === null || (body && segmentHitsBody(body, tracer.frame, hit.mirrorPoint, hit.domePoint))) {
        cell[k] = -1;
        continue;
      }
      const ci = Math.min(nc - 1, Math.max(0, Math.floor(hit.pixel[0] / s.cellW)));
      const cj = Math.min(s.rows - 2, Math.max(0, Math.floor(hit.pixel[1] / s.cellH)));
      cell[k] = cj * nc + ci;
    }
  }
  return { size, cell };
}

/** A cell's value, or its nearest finite neighbour's (edge cells are not whole). */
function cellValue(values: Float64Array, c: number, nc: number, nr: number): number {
  if (Number.isFinite(values[c])) return values[c];
  const ci = c % nc;
  const cj = Math.floor(c / nc);
  for (let rad = 1; rad <= 3; rad++)
    for (let dj = -rad; dj <= rad; dj++)
      for (let di = -rad; di <= rad; di++) {
        const i = ci + di;
        const j = cj + dj;
        if (i < 0 || j < 0 || i >= nc || j >= nr) continue;
        const v = values[j * nc + i];
        if (Number.isFinite(v)) return v;
      }
  return Number.NaN;
}

export interface FisheyeMapOptions {
  title: string;
  subtitle: string;
  scaleTitle: string;
  /** Value → t ∈ [0, 1] on the colour map; values outside are clamped. */
  min: number;
  max: number;
  format: (v: number) => string;
  /** Reverse the map so that low values are light. */
  reverse?: boolean;
}

const UNLIT: Rgb8 = PALETTE.unlit;
const HATCH: Rgb8 = [176, 180, 188];
const BELOW: Rgb8 = [236, 232, 224];

/** The map's pixels: the figure's colour per lit pixel, hatched grey where the dome is not lit, transparent off the disc. */
function mapRaster(a: RigAnalysis, lookup: FisheyeLookup, values: Float64Array, colour: (v: number) => Rgb8): Uint8Array {
  const N = lookup.size;
  const nc = a.sample.cols - 1;
  const nr = a.sample.rows - 1;
  const rgba = new Uint8Array(N * N * 4);
  for (let j = 0; j < N; j++)
    for (let i = 0; i < N; i++) {
      const k = j * N + i;
      const c = lookup.cell[k];
      if (c === -2) continue;
      let col = UNLIT;
      if (c === -1 && (i + j) % 8 === 0) col = HATCH; // a gap reads as a gap, not as a colour
      else if (c === -3) col = BELOW;
      else if (c >= 0) {
        const v = cellValue(values, c, nc, nr);
        if (Number.isFinite(v)) col = colour(v);
      }
      rgba.set([col[0], col[1], col[2], 255], 4 * k);
    }
  return rgba;
}

/** A fisheye map of a per-cell figure with its colour scale, dome grid and labels. */
export async function drawFisheyeMap(a: RigAnalysis, lookup: FisheyeLookup, values: Float64Array, o: FisheyeMapOptions, id: string): Promise<Picture> {
  const N = lookup.size;
  const ox = 110;
  const oy = 100;
  const pic = new SvgPicture(ox + N + 250, oy + N + 96, id, o.title, PAPER);
  const ramp = (t: number) => dusk(o.reverse ? 1 - t : t);
  const uri = await rasterDataUri(mapRaster(a, lookup, values, (v) => ramp((v - o.min) / (o.max - o.min))), N, N);
  pic.image(ox, oy, N, N, uri);
  heading(pic, o.title, o.subtitle);
  drawDomeGrid(pic, ox + N / 2, oy + N / 2, N / 2, a.sample.tracer.rig.content.fov);
  drawColourScale(pic, { x: ox + N + 110, y: oy + 30, width: 22, height: N - 60, min: o.min, max: o.max, colour: ramp, ticks: niceTicks(o.min, o.max, 6), format: o.format, title: o.scaleTitle, ink: INK, style: LABEL });
  const ly = oy + N + 36;
  pic.rect(24, ly, 14, 14, { fill: UNLIT, stroke: FAINT });
  pic.line(24, ly + 14, 38, ly, { stroke: HATCH, width: 1 });
  pic.text('not lit', 46, ly + 7, { ...LABEL, baseline: 'middle' });
  pic.text('Seen from inside, dome master orientation: front (azimuth 0°) at the bottom, right at the right.', 24, ly + 40, NOTE);
  return pic.finish();
}

/** Candidate anchors for a label centred `gap` pixels beyond radius r of (cx, cy) along each angle (radians, screen). */
function aroundRing(text: string, cx: number, cy: number, r: number, angles: readonly number[], gap: number, outward: boolean): Anchor[] {
  const { box } = textBox(text, 0, 0, ON_MAP);
  return angles.map((t) => {
    const ux = Math.cos(t);
    const uy = Math.sin(t);
    const reach = Math.abs((box.w / 2) * ux) + Math.abs((box.h / 2) * uy) + gap; // the box's half-extent along u
    const d = outward ? r + reach : r - reach;
    return { x: cx + d * ux, y: cy + d * uy, align: 'middle', baseline: 'middle' };
  });
}

/** Altitude rings every 30°, azimuth spokes every 45° with labels, on a fisheye disc of radius R. */
function drawDomeGrid(pic: SvgPicture, cx: number, cy: number, R: number, fov: number): void {
  const rho = (alt: number) => (R * (90 - alt) * DEG) / (fov / 2);
  const rings = [30, 60].filter((alt) => rho(alt) < R - 1);
  for (const alt of rings) {
    pic.circle(cx, cy, rho(alt), { stroke: [255, 255, 255], width: 2.5, opacity: 0.55 });
    pic.circle(cx, cy, rho(alt), { stroke: INK, width: 1, opacity: 0.6, dash: [6, 4] });
    pic.keepClear.push({ kind: 'circle', cx, cy, r: rho(alt), width: 2.5 });
  }
  pic.circle(cx, cy, R, { stroke: INK, width: 1.5 });
  pic.keepClear.push({ kind: 'circle', cx, cy, r: R, width: 1.5 });
  const screen = (az: number) => [Math.sin(az * DEG), Math.cos(az * DEG)];
  for (let az = 0; az < 360; az += 45) {
    const [sx, sy] = screen(az);
    pic.line(cx + sx * rho(75), cy + sy * rho(75), cx + sx * R, cy + sy * R, { stroke: INK, width: 1, opacity: 0.35, dash: [3, 4] });
    pic.keepClear.push({ kind: 'segment', x1: cx + sx * rho(75), y1: cy + sy * rho(75), x2: cx + sx * R, y2: cy + sy * R, width: 1 });
  }
  for (let az = 0; az < 360; az += 45) {
    const name = az === 0 ? '0° front' : az === 90 ? '90° right' : az === 180 ? '180° back' : az === 270 ? '270° left' : `${az}°`;
    const t = Math.atan2(Math.cos(az * DEG), Math.sin(az * DEG));
    placeLabel(pic, name, LABEL, [...aroundRing(name, cx, cy, R, [t], 8, true), ...aroundRing(name, cx, cy, R, [t], 22, true)]);
  }
  // ring labels between the spokes, just outside their ring, on a clear stretch
  const between = [-67.5, -22.5, -112.5, -157.5, 22.5, 67.5, 112.5, 157.5].map((d) => d * DEG);
  for (const alt of rings) {
    const text = `${alt}°`;
    placeLabel(pic, text, ON_MAP, [...aroundRing(text, cx, cy, rho(alt), between, 4, true), ...aroundRing(text, cx, cy, rho(alt), between, 4, false)]);
  }
  pic.circle(cx, cy, 2.5, { fill: INK });
  placeLabelIfClear(pic, 'zenith', ON_MAP, [
    { x: cx + 6, y: cy + 4, baseline: 'top' },
    { x: cx + 6, y: cy - 4, baseline: 'bottom' },
    { x: cx - 6, y: cy + 4, align: 'end', baseline: 'top' },
    { x: cx, y: cy + 5, align: 'middle', baseline: 'top' },
    { x: cx, y: cy - 5, align: 'middle', baseline: 'bottom' },
  ]);
}
