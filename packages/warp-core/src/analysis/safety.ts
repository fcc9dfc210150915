/**
 * Safety of the beam: where the projector's light passes through the heights at which people's eyes
 * are, and the standing cautions. The concentrated beam between the lens and the mirror is the danger;
 * reflected light is spread thinner, but anyone whose eyes are in it and who looks toward the mirror
 * sees the lens's reflection.
 */
import { azAltFromDirection, RAD, type ReadonlyVec3, type Vec3 } from '../math.js';
import { reflectionPoint } from '../locate.js';
import { onCap } from '../optics/mirror.js';
import { insideFrame, rayToPixel } from '../optics/projector.js';
import { segmentHitsBody } from './body.js';
import { landing } from './light.js';
import { formatLength } from '../units.js';
import type { FrameSample } from './sample.js';
import { HitKind } from '../trace.js';
import { strayLandings } from './spill.js';
import { azimuthArc, roundFigure as r } from './stats.js';

export interface EyeBand {
  name: 'floor-seated' | 'seated' | 'standing';
  label: string;
  /** Metres above the floor. */
  from: number;
  to: number;
}

/**
 * Eye heights above the floor. Common practice (no standard behind these numbers): seated adults'
 * eyes ≈ 1.2 m, standing adults' 1.5–1.8 m; audiences of portable domes often sit on the floor or on
 * cushions, eyes ≈ 0.6–0.9 m.
 */
export const EYE_BANDS: readonly EyeBand[] = [
  { name: 'floor-seated', label: 'sitting on the floor', from: 0.6, to: 0.9 },
  { name: 'seated', label: 'seated on chairs', from: 1.1, to: 1.3 },
  { name: 'standing', label: 'standing', from: 1.5, to: 1.8 },
];

/** The cautions every report carries, whatever the rig. */
export const STANDING_CAUTIONS: readonly string[] = [
  'Never look into the beam, and never let anyone else: the light between projector and mirror can cross the dome at eye height.',
  'Secure the mirror and its stand, and the projector, so that neither can tip, slide or be knocked over in the dark.',
  'Keep aisles and exits clear and lit to the level local rules require; people move in the dark here.',
  'Projectors run hot: keep vents clear, keep hands and fabric away, and route and tape down cables so nobody trips.',
  "Local fire and building codes, licensed practice and the projector maker's instructions come first; this report does not replace them (for the photobiological safety of image projectors, see IEC 62471-5 and the maker's hazard distance).",
];

export type FindingLevel = 'danger' | 'caution' | 'note';
export interface Finding {
  level: FindingLevel;
  text: string;
}

export interface BandZone {
  name: EyeBand['name'];
  label: string;
  /** Metres above the floor; source: common practice. */
  from: number;
  to: number;
  directBeam: {
    crosses: boolean;
    /** Horizontal distance from the lens where the beam is in the band. */
    distanceFromLens: [number, number] | null;
    /** Plan-view extent of that zone (world x and y). */
    x: [number, number] | null;
    y: [number, number] | null;
  };
  /** The part of the beam that misses the mirror and goes on to the back of the room (blacked out by the mesh). */
  pastMirror: {
    crosses: boolean;
    distanceFromLens: [number, number] | null;
  };
  reflected: {
    crosses: boolean;
    /** Share of the room's floor area above which the reflected light passes through the band. */
    floorShare: number | null;
    /** Farthest horizontal distance from the mirror at which it does. */
    reachFromMirror: number | null;
    /** Azimuth arc where the picture meets the dome or wall at this eye height (light returning to eye level near the walls). */
    wallAzimuths: [number, number] | null;
  };
}

export interface SafetyFigures {
  floorKnown: boolean;
  /** Height of the lens and of the mirror's centre above the floor. */
  lensHeight: number | null;
  mirrorHeight: number | null;
  bands: BandZone[];
  findings: Finding[];
  cautions: readonly string[];
  source: string;
}

/** Plan-view rasters (n × n over [−R, R]², row 0 at +y) marking where light crosses each band. */
export interface SafetyZones {
  n: number;
  extent: number;
  /** The beam from the lens to the mirror. */
  direct: Uint8Array[];
  /** The part of the beam that misses the mirror and goes on. */
  pastMirror: Uint8Array[];
  /** Lit, reflected light (the picture). */
  reflected: Uint8Array[];
}

/** "all around the dome", "between azimuths 120° and 240°", or "all around except azimuths 171°–189°". */
export function describeArc(arc: readonly [number, number]): string {
  const [a, b] = arc;
  if ((b - a >= 359.5 && a <= 0.5) || (b - a + 360) % 360 >= 350) return 'all around the dome';
  const span = (b - a + 360) % 360;
  if (span > 300) return `all around the dome except between azimuths ${b.toFixed(0)}° and ${a.toFixed(0)}°`;
  return `between azimuths ${a.toFixed(0)}° and ${b.toFixed(0)}°`;
}

/**
 * True when picture light (lit content, not blocked by the body) reflected by the mirror passes through
 * the point Q: the reflection point from the lens to Q (`reflectionPoint`) must be on the cap, be the
 * ray's first hit and lie inside the frame, and the light must go on to the content on the dome.
 */
export function reflectedThrough(s: FrameSample, Q: Vec3): boolean {
  const tracer = s.tracer;
  const { dome, content, projector } = tracer.rig;
  const mirror = tracer.rig.mirror;
  const f = tracer.frame;
  const P = f.origin;
  if (Math.hypot(Q[0] - mirror.center[0], Q[1] - mirror.center[1], Q[2] - mirror.center[2]) <= mirror.radius) return false;
  const X = reflectionPoint(P, mirror.center, mirror.radius, Q);
  if (X === null || !onCap(mirror, X)) return false;
  const px = rayToPixel(f, [X[0] - P[0], X[1] - P[1], X[2] - P[2]]);
  if (px === null || !insideFrame(f, px[0], px[1])) return false;
  const ql = Math.hypot(Q[0] - X[0], Q[1] - X[1], Q[2] - X[2]);
  const d: Vec3 = [(Q[0] - X[0]) / ql, (Q[1] - X[1]) / ql, (Q[2] - X[2]) / ql];
  const l = landing(X, d, dome.radius, dome.floor, dome.mesh);
  const D = l.point;
  // light through an opening of an as-built dome is no picture: the mesh blacks it out
  if (D[2] < 0 || l.throughOpening) return false;
  const w: Vec3 = [D[0] - content.eye[0], D[1] - content.eye[1], D[2] - content.eye[2]];
  const wl = Math.hypot(w[0], w[1], w[2]);
  if (Math.acos(Math.max(-1, Math.min(1, w[2] / wl))) > content.fov / 2) return false;
  return !(projector.body && segmentHitsBody(projector.body, f, X, D));
}

/** The part [ta, tb] of the segment a → b with z in [lo, hi], or null. */
function clipZ(a: ReadonlyVec3, b: ReadonlyVec3, lo: number, hi: number): [number, number] | null {
  const dz = b[2] - a[2];
  if (Math.abs(dz) < 1e-12) return a[2] >= lo && a[2] <= hi ? [0, 1] : null;
  let t0 = (lo - a[2]) / dz;
  let t1 = (hi - a[2]) / dz;
  if (t0 > t1) [t0, t1] = [t1, t0];
  t0 = Math.max(0, t0);
  t1 = Math.min(1, t1);
  return t0 <= t1 ? [t0, t1] : null;
}

/** Cells per side of the plan-view rasters. */
const PLAN_CELLS = 120;

/** A plan-view raster n × n over [−R, R]², row 0 at +y. */
interface PlanGrid {
  n: number;
  extent: number;
  cells: Uint8Array;
}

function planGrid(extent: number): PlanGrid {
  return { n: PLAN_CELLS, extent, cells: new Uint8Array(PLAN_CELLS * PLAN_CELLS) };
}

/** The smallest and largest of the values seen so far (empty: min = Infinity). */
class Span {
  min = Infinity;
  max = -Infinity;
  add(v: number): void {
    this.min = Math.min(this.min, v);
    this.max = Math.max(this.max, v);
  }
  get empty(): boolean {
    return !Number.isFinite(this.min);
  }
  rounded(): [number, number] | null {
    return this.empty ? null : [r(this.min, 3)!, r(this.max, 3)!];
  }
}

/** Marks the plan-view cells under the part [t0, t1] of the segment a → b, calling `visit` at each step. */
function markSegment(grid: PlanGrid, a: ReadonlyVec3, b: ReadonlyVec3, t0: number, t1: number, visit: (x: number, y: number) => void): void {
  const { n, extent: R } = grid;
  const cell = (2 * R) / n;
  const ax = a[0] + t0 * (b[0] - a[0]);
  const ay = a[1] + t0 * (b[1] - a[1]);
  const bx = a[0] + t1 * (b[0] - a[0]);
  const by = a[1] + t1 * (b[1] - a[1]);
  const steps = Math.ceil(Math.hypot(bx - ax, by - ay) / cell) + 1;
  for (let q = 0; q <= steps; q++) {
    const x = ax + ((bx - ax) * q) / steps;
    const y = ay + ((by - ay) * q) / steps;
    visit(x, y);
    const i = Math.floor((x + R) / cell);
    const j = Math.floor((R - y) / cell);
    if (i >= 0 && j >= 0 && i < n && j < n) grid.cells[j * n + i] = 1;
  }
}

/** Where the direct beam (lens to mirror, and past a missed mirror) runs between heights lo and hi. */
interface BeamCrossings {
  direct: PlanGrid;
  past: PlanGrid;
  /** Horizontal distances from the lens, and plan-view x and y, of the beam to the mirror in the band. */
  distance: Span;
  x: Span;
  y: Span;
  /** Horizontal distances from the lens of the beam that misses the mirror, in the band. */
  pastMirror: Span;
  /** Azimuths (degrees) where lit picture meets the dome or wall inside the band. */
  wallAzimuths: number[];
}

function beamCrossings(s: FrameSample, landings: ReturnType<typeof strayLandings>, lo: number, hi: number): BeamCrossings {
  const P = s.tracer.frame.origin;
  const c: BeamCrossings = { direct: planGrid(s.tracer.rig.dome.radius), past: planGrid(s.tracer.rig.dome.radius), distance: new Span(), x: new Span(), y: new Span(), pastMirror: new Span(), wallAzimuths: [] };
  const visitPast = (x: number, y: number) => c.pastMirror.add(Math.hypot(x - P[0], y - P[1]));
  const visitDirect = (x: number, y: number) => {
    c.distance.add(Math.hypot(x - P[0], y - P[1]));
    c.x.add(x);
    c.y.add(y);
  };
  // every other vertex each way is plenty for a plan-view raster of 4 cm cells
  const stride = s.cols * s.rows > 40_000 ? 2 : 1;
  for (let k = 0; k < s.kind.length; k++) {
    if (stride > 1 && ((k % s.cols) % stride !== 0 || Math.floor(k / s.cols) % stride !== 0)) continue;
    const kind = s.kind[k];
    const l = landings[k];
    if (kind === HitKind.MirrorMiss) {
      if (!l) continue;
      const t = clipZ(P, l.point, lo, hi);
      if (t) markSegment(c.past, P, l.point, t[0], t[1], visitPast);
      continue;
    }
    const X: Vec3 = [s.mirrorPoint[3 * k], s.mirrorPoint[3 * k + 1], s.mirrorPoint[3 * k + 2]];
    const t = clipZ(P, X, lo, hi);
    if (t) markSegment(c.direct, P, X, t[0], t[1], visitDirect);
    // outside the content: blacked out by the mesh, and its black level is the spill figures' business
    if (kind !== HitKind.Lit) continue;
    const end: ReadonlyVec3 = l ? l.point : [s.point[3 * k], s.point[3 * k + 1], s.point[3 * k + 2]];
    if (end[2] >= lo && end[2] <= hi) c.wallAzimuths.push(azAltFromDirection([end[0], end[1], 0])[0] * RAD);
  }
  return c;
}

/** Where lit, reflected light passes between heights lo and hi, over the floor inside the wall. */
interface ReflectedCrossings {
  reflected: PlanGrid;
  /** Share of the floor cells inside the wall at the band's middle height. */
  floorShare: number | null;
  /** Farthest horizontal distance from the mirror's centre, or null when none. */
  reach: number | null;
}

function reflectedCrossings(s: FrameSample, lo: number, hi: number): ReflectedCrossings {
  const R = s.tracer.rig.dome.radius;
  const C = s.tracer.rig.mirror.center;
  const grid = planGrid(R);
  const { n } = grid;
  const cell = (2 * R) / n;
  const zMid = (lo + hi) / 2;
  const wallR = Math.sqrt(Math.max(0, R * R - zMid * zMid));
  let inside = 0;
  let hit = 0;
  let reach = -Infinity;
  for (let j = 0; j < n; j++)
    for (let i = 0; i < n; i++) {
      const x = -R + (i + 0.5) * cell;
      const y = R - (j + 0.5) * cell;
      if (Math.hypot(x, y) > wallR) continue;
      inside++;
      // exact: does lit, reflected light pass through this point at any of three heights in the band?
      if (![lo, zMid, hi].some((z) => reflectedThrough(s, [x, y, z]))) continue;
      grid.cells[j * n + i] = 1;
      hit++;
      reach = Math.max(reach, Math.hypot(x - C[0], y - C[1]));
    }
  return { reflected: grid, floorShare: inside ? r(hit / inside, 3) : null, reach: hit ? Math.max(0, reach) : null };
}

function bandZone(band: EyeBand, beam: BeamCrossings, light: ReflectedCrossings): BandZone {
  const crosses = !beam.distance.empty;
  return {
    name: band.name,
    label: band.label,
    from: band.from,
    to: band.to,
    directBeam: { crosses, distanceFromLens: beam.distance.rounded(), x: beam.x.rounded(), y: beam.y.rounded() },
    pastMirror: { crosses: !beam.pastMirror.empty, distanceFromLens: beam.pastMirror.rounded() },
    reflected: {
      crosses: light.reach !== null,
      floorShare: light.floorShare,
      reachFromMirror: light.reach === null ? null : r(light.reach, 3),
      wallAzimuths: beam.wallAzimuths.length ? (azimuthArc(beam.wallAzimuths)!.map((a) => r(a, 1)) as [number, number]) : null,
    },
  };
}

/** The findings for one eye-height band, lengths written by L. */
function bandFindings(z: BandZone, band: EyeBand, L: (m: number) => string): Finding[] {
  const findings: Finding[] = [];
  const who = `people ${band.label} (${L(band.from)} to ${L(band.to)} above the floor)`;
  if (z.directBeam.crosses) {
    const [d0, d1] = z.directBeam.distanceFromLens!;
    const [x0, x1] = z.directBeam.x!;
    const [y0, y1] = z.directBeam.y!;
    findings.push({
      level: 'danger',
      text: `The beam from the projector runs at the eye height of ${who} from ${L(d0)} to ${L(d1)} from the lens, over x ${L(x0)} to ${L(x1)}, y ${L(y0)} to ${L(y1)}. Nobody may sit, stand or walk there: rope the zone off or raise the beam.`,
    });
  }
  if (z.pastMirror.crosses) {
    const [d0, d1] = z.pastMirror.distanceFromLens!;
    findings.push({
      level: 'caution',
      text: `Part of the frame misses the mirror and goes on at the eye height of ${who}, ${L(d0)} to ${L(d1)} from the lens. The warp mesh blacks it out, but the projector's start-up screen and menus are not warped: never stand behind the mirror, and keep the menus off during shows.`,
    });
  }
  if (z.reflected.wallAzimuths) {
    findings.push({
      level: 'caution',
      text: `The picture itself meets the dome at the eye height of ${who} ${describeArc(z.reflected.wallAzimuths)}: people there have the light in their eyes, and anyone who looks toward the mirror sees the lens's reflection. Seat people so that they face away from the mirror, or keep the lowest part of the picture dark.`,
    });
  } else if (z.reflected.crosses && (z.reflected.floorShare ?? 0) > 0) {
    findings.push({
      level: 'caution',
      text: `Reflected light passes through the eye height of ${who} over ${((z.reflected.floorShare ?? 0) * 100).toFixed(0)}% of the floor, up to ${L(z.reflected.reachFromMirror ?? 0)} from the mirror: nobody should look toward the mirror from there.`,
    });
  }
  return findings;
}

/** The one note a rig without dome.floor gets. */
function floorUnknown(): { figures: SafetyFigures; zones: null } {
  const findings: Finding[] = [{ level: 'note', text: 'dome.floor is not given, so eye heights cannot be placed: add how far the floor lies below the springline for the eye-height findings.' }];
  return { figures: { floorKnown: false, lensHeight: null, mirrorHeight: null, bands: [], findings, cautions: STANDING_CAUTIONS, source: 'common practice' }, zones: null };
}

export function safetyFigures(s: FrameSample, lengthText?: (metres: number, digits: number) => string): { figures: SafetyFigures; zones: SafetyZones | null } {
  const rig = s.tracer.rig;
  const floor = rig.dome.floor;
  if (floor === undefined) return floorUnknown();
  const L = (m: number) => (lengthText ? lengthText(m, 2) : formatLength(m, rig.units, 2));
  const landings = strayLandings(s);
  const bands: BandZone[] = [];
  const findings: Finding[] = [];
  const zones: SafetyZones = { n: PLAN_CELLS, extent: rig.dome.radius, direct: [], pastMirror: [], reflected: [] };
  for (const band of EYE_BANDS) {
    // band heights from the springline, where the trace's z is measured
    const lo = band.from - floor;
    const hi = band.to - floor;
    const beam = beamCrossings(s, landings, lo, hi);
    const light = reflectedCrossings(s, lo, hi);
    const zone = bandZone(band, beam, light);
    bands.push(zone);
    findings.push(...bandFindings(zone, band, L));
    zones.direct.push(beam.direct.cells);
    zones.pastMirror.push(beam.past.cells);
    zones.reflected.push(light.reflected.cells);
  }
  const lensH = s.tracer.frame.origin[2] + floor;
  const mirrorH = rig.mirror.center[2] + floor;
  if (!findings.some((f) => f.level === 'danger')) {
    findings.unshift({ level: 'note', text: `The beam between projector and mirror stays clear of the eye-height bands (the lens is ${L(lensH)} above the floor, the mirror's centre ${L(mirrorH)}); a child or someone bending down can still meet it, so keep its path clear.` });
  }
  return {
    figures: { floorKnown: true, lensHeight: r(lensH, 3), mirrorHeight: r(mirrorH, 3), bands, findings, cautions: STANDING_CAUTIONS, source: 'common practice' },
    zones,
  };
}
