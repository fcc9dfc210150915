/**
 * Projector-space marker frames for observation sessions: numbered crosshairs centred exactly on given
 * continuous projector pixel coordinates (pixel centres at +0.5), so an operator can note where each
 * lands on the dome. All markers in one frame, or one frame per marker.
 */
import { drawText, textSize } from './digit-font.js';
import { createRgbImage, fillDisc, strokeRing, strokeSegment, type Rgb, type RgbImage } from './raster.js';

export interface Marker {
  x: number;
  y: number;
  /** Default: the marker's 1-based number. */
  label?: string;
  /** Draw the label mirrored left-right, for a marker whose light is reflected once more than it is turned (it then reads correctly on the dome). */
  mirrored?: boolean;
}

export interface MarkerFrameOptions {
  /** Crosshair arm length in pixels (0 = from the frame size). */
  arm: number;
  /** Line width in pixels (0 = from the frame size). */
  lineWidth: number;
  color: Rgb;
  background: Rgb;
}

export const MARKER_FRAME_DEFAULTS: Readonly<MarkerFrameOptions> = {
  arm: 0,
  lineWidth: 0,
  color: [255, 255, 255],
  background: [0, 0, 0],
};

/**
 * Draws numbered crosshairs on a width × height frame. Each is a cross with a small gap at its centre
 * (the exact point stays a single bright dot), a ring, and its number above-right.
 */
export function drawMarkerFrame(width: number, height: number, markers: readonly Marker[], options: Partial<MarkerFrameOptions> = {}): RgbImage {
  const o = { ...MARKER_FRAME_DEFAULTS, ...options };
  const img = createRgbImage(width, height, o.background);
  const short = Math.min(width, height);
  const arm = o.arm > 0 ? o.arm : Math.max(6, short / 30);
  const lw = o.lineWidth > 0 ? o.lineWidth : Math.max(1, short / 600);
  const half = lw / 2;
  const scale = Math.max(1, Math.round(short / 240));
  markers.forEach((m, n) => {
    const { x, y } = m;
    const gap = arm * 0.25;
    strokeSegment(img, x - arm, y, x - gap, y, half, o.color);
    strokeSegment(img, x + gap, y, x + arm, y, half, o.color);
    strokeSegment(img, x, y - arm, x, y - gap, half, o.color);
    strokeSegment(img, x, y + gap, x, y + arm, half, o.color);
    strokeRing(img, x, y, arm * 0.6, half, o.color);
    fillDisc(img, x, y, Math.max(0.75, lw * 0.75), o.color);
    const label = m.label ?? String(n + 1);
    const [w, h] = textSize(label, scale);
    // above-right of the ring, flipped inward near the frame's edges
    let left = x + arm * 0.6 + scale;
    let top = y - arm * 0.6 - h - scale;
    if (left + w > width) left = x - arm * 0.6 - scale - w;
    if (top < 0) top = y + arm * 0.6 + scale;
    if (m.mirrored) drawTextMirrored(img, label, Math.round(left), Math.round(top), scale, o.color);
    else drawText(img, label, left, top, scale, o.color);
  });
  return img;
}

/** The label drawn as drawText draws it, then mirrored left-right about the middle of its box. */
function drawTextMirrored(img: RgbImage, label: string, left: number, top: number, scale: number, color: Rgb): void {
  const [w, h] = textSize(label, scale);
  const off: Rgb = color[0] === 0 && color[1] === 0 && color[2] === 0 ? [255, 255, 255] : [0, 0, 0];
  const glyphs = createRgbImage(Math.max(1, Math.ceil(w)), Math.max(1, Math.ceil(h)), off);
  drawText(glyphs, label, 0, 0, scale, color);
  for (let j = 0; j < glyphs.height; j++)
    for (let i = 0; i < glyphs.width; i++) {
      const s = 3 * (j * glyphs.width + i);
      if (glyphs.data[s] === off[0] && glyphs.data[s + 1] === off[1] && glyphs.data[s + 2] === off[2]) continue;
      const x = left + glyphs.width - 1 - i;
      const y = top + j;
      if (x < 0 || y < 0 || x >= img.width || y >= img.height) continue;
      const t = 3 * (y * img.width + x);
      img.data[t] = glyphs.data[s];
      img.data[t + 1] = glyphs.data[s + 1];
      img.data[t + 2] = glyphs.data[s + 2];
    }
}
