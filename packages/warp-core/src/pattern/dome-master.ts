/**
 * Dome-master alignment patterns (DESIGN.md "Fisheye convention"): altitude rings and azimuth spokes
 * at chosen steps, a zenith target, marks for the dome's front, right, back and left, and numbered
 * dots at chosen directions — to check a warp on the dome by eye. Front is at the bottom of the frame,
 * the viewer's right on the right.
 */
import { DEG } from '../math.js';
import { drawText, drawTextCentred, textSize } from './digit-font.js';
import { blendPixel, createRgbImage, fillDisc, fillTriangle, strokeCoverage, strokeRing, strokeSegment, type Rgb, type RgbImage } from './raster.js';

export interface PatternDot {
  /** Radians, 0 = front, π/2 = right. */
  azimuth: number;
  /** Radians above the springline. */
  altitude: number;
  /** Drawn beside the dot (digits, F R B L, '-' and '.'); default its 1-based number. */
  label?: string;
}

export interface DomePatternOptions {
  /** Width and height of the square dome master, pixels. */
  size: number;
  /** The dome master's full field of view, radians (π = down to the horizon). */
  fov: number;
  /** Altitude between rings, radians (0 = none). */
  ringStep: number;
  /** Azimuth between spokes, radians (0 = none). */
  spokeStep: number;
  /** Line width in pixels (0 = from the size). */
  lineWidth: number;
  zenithTarget: boolean;
  /** Front, right, back and left marks at the horizon. */
  directionMarks: boolean;
  /** Write each ring's altitude beside it, along the 45° spoke. */
  ringLabels: boolean;
  dots: PatternDot[];
}

export const DOME_PATTERN_DEFAULTS: Readonly<DomePatternOptions> = {
  size: 2048,
  fov: Math.PI,
  ringStep: 10 * DEG,
  spokeStep: 30 * DEG,
  lineWidth: 0,
  zenithTarget: true,
  directionMarks: true,
  ringLabels: true,
  dots: [],
};

/** Our own palette: grey grid, white horizon, amber front, cool zenith, green dots. */
export const PATTERN_COLORS = {
  background: [0, 0, 0] as Rgb,
  grid: [120, 120, 120] as Rgb,
  majorGrid: [190, 190, 190] as Rgb,
  horizon: [255, 255, 255] as Rgb,
  front: [255, 168, 24] as Rgb,
  side: [225, 225, 225] as Rgb,
  zenith: [70, 200, 255] as Rgb,
  dot: [90, 240, 120] as Rgb,
  label: [255, 255, 255] as Rgb,
} as const;

/** Where direction (azimuth, altitude) sits in an N×N dome master of the given fov, in pixels. */
export function domeMasterPixel(size: number, fov: number, azimuth: number, altitude: number): [number, number] {
  const rho = ((Math.PI / 2 - altitude) / (fov / 2)) * (size / 2);
  return [size / 2 + rho * Math.sin(azimuth), size / 2 + rho * Math.cos(azimuth)];
}

function checkOptions(o: DomePatternOptions): void {
  if (!(Number.isInteger(o.size) && o.size >= 16)) throw new Error(`Expected whole number ≥ 16 for size but received ${o.size}`);
  if (!(o.fov > 0 && o.fov <= 2 * Math.PI)) throw new Error(`Expected fov in (0, 2π] but received ${o.fov}`);
  if (!(o.ringStep >= 0) || !(o.spokeStep >= 0)) throw new Error(`Expected non-negative ring and spoke steps but received ${o.ringStep}, ${o.spokeStep}`);
  if (!(o.lineWidth >= 0)) throw new Error(`Expected non-negative lineWidth but received ${o.lineWidth}`);
}

/** Draws a dome-master alignment pattern as an 8-bit RGB image. */
export function drawDomePattern(options: Partial<DomePatternOptions> = {}): RgbImage {
  const o: DomePatternOptions = { ...DOME_PATTERN_DEFAULTS, ...options };
  checkOptions(o);
  const N = o.size;
  const img = createRgbImage(N, N, PATTERN_COLORS.background);
  const c = N / 2;
  const pxPerRad = c / (o.fov / 2); // fisheye radius per radian from the zenith
  const lw = o.lineWidth > 0 ? o.lineWidth : Math.max(1, N / 1024);
  const half = lw / 2;
  const edge = c; // the content circle's radius
  const horizonRho = (Math.PI / 2) * pxPerRad;
  const targetRho = Math.min(0.045 * N, (o.ringStep > 0 ? o.ringStep : 10 * DEG) * pxPerRad * 0.6);
  const ringStepPx = o.ringStep * pxPerRad;

  // rings and spokes: one pass over the pixels, each finding its nearest ring and spoke
  for (let j = 0; j < N; j++) {
    const y = j + 0.5 - c;
    for (let i = 0; i < N; i++) {
      const x = i + 0.5 - c;
      const rho = Math.hypot(x, y);
      if (rho > edge + lw) continue;
      let cover = 0;
      let color = PATTERN_COLORS.grid;
      if (o.ringStep > 0) {
        // rings at zenith angles k·step (altitude 90° − k·step), the zenith itself excluded
        const k = Math.max(1, Math.round(rho / ringStepPx));
        const d = Math.abs(rho - k * ringStepPx);
        if (k * ringStepPx <= edge + 0.5) cover = strokeCoverage(d, half);
      }
      const dh = Math.abs(rho - horizonRho);
      if (horizonRho <= edge + 0.5) {
        const ch = strokeCoverage(dh, lw);
        if (ch > 0) {
          cover = Math.max(cover, ch);
          color = PATTERN_COLORS.horizon;
        }
      }
      if (o.spokeStep > 0 && rho >= targetRho) {
        // azimuth measured like the fisheye: sin az ∝ x, cos az ∝ y
        const az = Math.atan2(x, y);
        const k = Math.round(az / o.spokeStep);
        const dAz = az - k * o.spokeStep;
        const d = Math.abs(rho * Math.sin(dAz));
        const major = Math.abs(((k * o.spokeStep) / (Math.PI / 2)) - Math.round((k * o.spokeStep) / (Math.PI / 2))) < 1e-9;
        const cs = Math.abs(dAz) < Math.PI / 2 ? strokeCoverage(d, major ? half * 1.5 : half) : 0;
        if (cs > cover && color !== PATTERN_COLORS.horizon) {
          cover = cs;
          color = major ? PATTERN_COLORS.majorGrid : PATTERN_COLORS.grid;
        } else if (cs > 0 && color === PATTERN_COLORS.horizon) {
          cover = Math.max(cover, cs);
        }
      }
      if (cover > 0) blendPixel(img, i, j, color, cover);
    }
  }

  const textScale = Math.max(1, Math.round(N / 300));
  if (o.ringLabels && o.ringStep > 0) {
    for (let k = 1; k * ringStepPx < edge - 4 * textScale; k++) {
      const alt = Math.round((Math.PI / 2 - k * o.ringStep) / DEG);
      const label = String(alt);
      const rho = k * ringStepPx;
      const [w, h] = textSize(label, textScale);
      // just outside the ring, along the 45° (front-right) spoke, nudged off the line
      const ax = c + (rho + 2 * textScale) * Math.SQRT1_2 + textScale;
      const ay = c + (rho + 2 * textScale) * Math.SQRT1_2 - h - textScale;
      if (ax + w < N && ay > 0) drawText(img, label, ax, ay, textScale, PATTERN_COLORS.majorGrid, PATTERN_COLORS.background);
    }
  }

  if (o.zenithTarget && Math.PI / 2 <= o.fov) {
    // concentric rings and a cross with a gap: the centre stays visible on the dome
    strokeRing(img, c, c, targetRho, lw, PATTERN_COLORS.zenith);
    strokeRing(img, c, c, targetRho * 0.5, lw * 0.75, PATTERN_COLORS.zenith);
    const gap = targetRho * 0.18;
    const arm = targetRho * 1.25;
    strokeSegment(img, c - arm, c, c - gap, c, lw * 0.75, PATTERN_COLORS.zenith);
    strokeSegment(img, c + gap, c, c + arm, c, lw * 0.75, PATTERN_COLORS.zenith);
    strokeSegment(img, c, c - arm, c, c - gap, lw * 0.75, PATTERN_COLORS.zenith);
    strokeSegment(img, c, c + gap, c, c + arm, lw * 0.75, PATTERN_COLORS.zenith);
    fillDisc(img, c, c, Math.max(1, lw), PATTERN_COLORS.zenith);
  }

  if (o.directionMarks) {
    // an outward-pointing triangle on the horizon (or the frame's edge) and a letter inside it
    const rimRho = Math.min(horizonRho, edge) - 2 * lw;
    const size = Math.max(6, N / 48);
    const marks: [number, string][] = [
      [0, 'F'],
      [Math.PI / 2, 'R'],
      [Math.PI, 'B'],
      [(3 * Math.PI) / 2, 'L'],
    ];
    for (const [az, letter] of marks) {
      const color = letter === 'F' ? PATTERN_COLORS.front : PATTERN_COLORS.side;
      const ux = Math.sin(az);
      const uy = Math.cos(az);
      const tip: [number, number] = [c + rimRho * ux, c + rimRho * uy];
      const baseRho = rimRho - size;
      const b1: [number, number] = [c + baseRho * ux - (size / 2) * uy, c + baseRho * uy + (size / 2) * ux];
      const b2: [number, number] = [c + baseRho * ux + (size / 2) * uy, c + baseRho * uy - (size / 2) * ux];
      fillTriangle(img, tip, b1, b2, color);
      const letterRho = baseRho - size * 0.9;
      const ls = Math.max(1, Math.round(size / 6));
      drawTextCentred(img, letter, c + letterRho * ux, c + letterRho * uy, ls, color, PATTERN_COLORS.background);
      if (letter === 'F') {
        // the front is doubled so it cannot be mistaken for a side: a second, smaller triangle
        const r2 = baseRho - size * 1.8;
        const t2: [number, number] = [c + r2 * ux, c + r2 * uy];
        const s2 = size * 0.6;
        const c1: [number, number] = [c + (r2 - s2) * ux - (s2 / 2) * uy, c + (r2 - s2) * uy + (s2 / 2) * ux];
        const c2: [number, number] = [c + (r2 - s2) * ux + (s2 / 2) * uy, c + (r2 - s2) * uy - (s2 / 2) * ux];
        fillTriangle(img, t2, c1, c2, color);
      }
    }
    // azimuth numbers every 30° between the letters, on the letters' circle, as large as the letters
    const letterRho = rimRho - size * 1.9;
    const ls = Math.max(1, Math.round(size / 6));
    for (let deg = 30; deg < 360; deg += 30) {
      if (deg % 90 === 0) continue;
      drawTextCentred(img, String(deg), c + letterRho * Math.sin(deg * DEG), c + letterRho * Math.cos(deg * DEG), ls, PATTERN_COLORS.side, PATTERN_COLORS.background);
    }
  }

  const dotR = Math.max(2, N / 256);
  o.dots.forEach((dot, n) => {
    const [x, y] = domeMasterPixel(N, o.fov, dot.azimuth, dot.altitude);
    fillDisc(img, x, y, dotR, PATTERN_COLORS.dot);
    const label = dot.label ?? String(n + 1);
    drawText(img, label, x + dotR * 1.5 + textScale, y - dotR * 1.5 - textScale - textSize(label, textScale)[1], textScale, PATTERN_COLORS.label, PATTERN_COLORS.background);
  });
  return img;
}
