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
    drawText(img, label, left, top, scale, o.color);
  });
  return img;
}
