/**
 * The plan views of where light meets eye height, one panel per eye-height band, as an SVG picture:
 * the direct beam's zone and the reflected picture's zone in distinct colours, each named with its
 * extent in the rig's units.
 */
import { EYE_BANDS, type LengthUnit, type ReportFigures, type RigAnalysis } from '@skyfold/warp-core';
import { oklchToSrgb8, PALETTE, type Rgb8 } from './colormap.js';
import { rasterDataUri } from './render.js';
import { lengthLabel } from './scales.js';
import { SvgPicture, type Picture } from './svg.js';
import { heading, INK, LABEL, NOTE, PAPER } from './theme.js';

type BandZone = ReportFigures['safety']['bands'][number];

const REFLECTED: Rgb8 = oklchToSrgb8(0.86, 0.09, 75);
/** The beam that misses the mirror: blacked out by the mesh, but not the projector's menus. */
const PAST_MIRROR: Rgb8 = oklchToSrgb8(0.55, 0.12, 300);
/** Where the picture meets the dome or wall at eye height: an arc on the wall. */
const WALL: Rgb8 = oklchToSrgb8(0.6, 0.14, 50);
const CLEAR: Rgb8 = [238, 240, 242];
const MIRROR: Rgb8 = [70, 90, 140];

/** One band's plan raster: the beam's cells, the reflected light's cells, clear floor inside the wall, paper outside. */
function bandRaster(n: number, extent: number, wallR: number, direct: Uint8Array, past: Uint8Array, reflected: Uint8Array): Uint8Array {
  const rgba = new Uint8Array(n * n * 4);
  for (let j = 0; j < n; j++)
    for (let i = 0; i < n; i++) {
      const k = j * n + i;
      const x = -extent + ((i + 0.5) * 2 * extent) / n;
      const y = extent - ((j + 0.5) * 2 * extent) / n;
      const col = Math.hypot(x, y) > wallR ? PAPER : direct[k] ? PALETTE.caution : past[k] ? PAST_MIRROR : reflected[k] ? REFLECTED : CLEAR;
      rgba.set([col[0], col[1], col[2], 255], 4 * k);
    }
  return rgba;
}

/** The lines under a panel: the band, its heights, and what crosses it with the extents. */
function bandLines(z: BandZone, units: LengthUnit): string[] {
  const L = (m: number) => lengthLabel(m, units);
  const lines = [`eyes ${L(z.from)} to ${L(z.to)} above the floor`];
  const beam = z.directBeam.distanceFromLens;
  lines.push(beam ? `beam: ${L(beam[0])} to ${L(beam[1])} from the lens` : 'beam: clear of this band');
  const past = z.pastMirror.distanceFromLens;
  if (past) lines.push(`past the mirror: ${L(past[0])} to ${L(past[1])} from the lens`);
  const share = z.reflected.floorShare;
  const wall = z.reflected.wallAzimuths;
  if (wall) {
    const span = (((wall[1] - wall[0]) % 360) + 360) % 360 || 360;
    lines.push(span >= 350 ? 'on the wall: all around' : `on the wall: azimuths ${wall[0].toFixed(0)}° to ${wall[1].toFixed(0)}°`);
  }
  lines.push(z.reflected.crosses && share ? `picture: ${(share * 100).toFixed(0)}% of the floor, to ${L(z.reflected.reachFromMirror ?? 0)} from the mirror` : 'picture: clear of this band');
  return lines;
}

/** An SVG arc along the wall circle (centre cx, cy, radius r) between two azimuths in degrees, clockwise from the front (up). */
function wallArc(cx: number, cy: number, r: number, [a, b]: readonly [number, number]): string {
  const span = (((b - a) % 360) + 360) % 360 || 360;
  const at = (deg: number) => [cx + r * Math.sin((deg * Math.PI) / 180), cy - r * Math.cos((deg * Math.PI) / 180)].map((v) => v.toFixed(2)).join(' ');
  // a full circle as two half arcs (one SVG arc cannot end where it starts)
  if (span >= 359.5) return `M ${at(0)} A ${r} ${r} 0 1 1 ${at(180)} A ${r} ${r} 0 1 1 ${at(0)}`;
  return `M ${at(a)} A ${r} ${r} 0 ${span > 180 ? 1 : 0} 1 ${at(a + span)}`;
}

/** Plan views, one per eye-height band: where the direct beam and the reflected light cross it. */
export async function drawSafetyPlan(a: RigAnalysis, panel = 300): Promise<Picture | null> {
  const z = a.safetyZones;
  const rig = a.sample.tracer.rig;
  const floor = rig.dome.floor;
  if (!z || floor === undefined) return null;
  const gap = 28;
  const oy = 104;
  const lineH = 16;
  const pic = new SvgPicture(3 * panel + 4 * gap, oy + panel + 28 + 5 * lineH + 56, 'plan', 'Where light meets eye height (plan view)', PAPER);
  heading(pic, 'Where light meets eye height (plan view)', 'Seen from above, front at the top. Dot: lens; blue disc: mirror.');
  const R = rig.dome.radius;
  const s = panel / (2 * R);
  const P = a.sample.tracer.frame.origin;
  const C = rig.mirror.center;
  for (const [q, b] of EYE_BANDS.entries()) {
    const ox = gap + q * (panel + gap);
    const zMid = (b.from + b.to) / 2 - floor;
    const wallR = Math.sqrt(Math.max(0, R * R - zMid * zMid));
    pic.image(ox, oy, panel, panel, await rasterDataUri(bandRaster(z.n, z.extent, wallR, z.direct[q], z.pastMirror[q], z.reflected[q]), z.n, z.n));
    // plan: x to the right, +y (front) up
    pic.circle(ox + panel / 2, oy + panel / 2, wallR * s, { stroke: INK, width: 1.5 });
    const zone = a.figures.safety.bands[q];
    const arc = zone.reflected.wallAzimuths;
    if (arc) pic.path(wallArc(ox + panel / 2, oy + panel / 2, wallR * s, arc), { stroke: WALL, width: 6, cap: 'butt' });
    pic.circle(ox + panel / 2 + C[0] * s, oy + panel / 2 - C[1] * s, Math.max(3, rig.mirror.radius * s), { fill: MIRROR });
    pic.circle(ox + panel / 2 + P[0] * s, oy + panel / 2 - P[1] * s, 4, { fill: INK });
    pic.text('front', ox + panel / 2, oy - 8, { ...NOTE, align: 'middle', baseline: 'bottom' });
    pic.text(b.label, ox, oy + panel + 22, LABEL);
    bandLines(zone, rig.units).forEach((t, k) => pic.text(t, ox, oy + panel + 22 + (k + 1) * lineH, NOTE));
  }
  const ly = pic.height - 30;
  const legend: [Rgb8, string][] = [
    [PALETTE.caution, 'the beam, lens to mirror'],
    [PAST_MIRROR, 'the beam past the mirror'],
    [REFLECTED, 'reflected light (the picture)'],
    [WALL, 'the picture at eye height on the wall'],
  ];
  let lx = 24;
  for (const [c, t] of legend) {
    pic.rect(lx, ly, 16, 12, { fill: c });
    const box = pic.text(t, lx + 24, ly + 6, { ...LABEL, baseline: 'middle' });
    lx = box.x + box.w + 26;
  }
  return pic.finish();
}
