/**
 * Drawing into 8-bit RGB images for alignment patterns: anti-aliased discs, rings, thick segments and
 * triangles, by the distance from each pixel centre to the shape (coverage = ½ + halfWidth − distance,
 * clamped to [0, 1]). Pixel (i, j) covers [i, i+1) × [j, j+1); its centre is (i + 0.5, j + 0.5). Only
 * the shape's bounding box is visited. Blending is on code values: these are line drawings, not photos.
 */
import type { ImageBuffer } from '../remap/types.js';

export type Rgb = readonly [number, number, number];

/** An 8-bit RGB image. */
export interface RgbImage extends ImageBuffer {
  channels: 3;
  data: Uint8Array;
}

export function createRgbImage(width: number, height: number, background: Rgb = [0, 0, 0]): RgbImage {
  if (!(Number.isInteger(width) && width > 0 && Number.isInteger(height) && height > 0)) {
    throw new Error(`Expected positive whole numbers for width and height but received ${width} × ${height}`);
  }
  const data = new Uint8Array(width * height * 3);
  if (background[0] || background[1] || background[2]) {
    for (let k = 0; k < width * height; k++) {
      data[3 * k] = background[0];
      data[3 * k + 1] = background[1];
      data[3 * k + 2] = background[2];
    }
  }
  return { width, height, channels: 3, data };
}

/** Mixes colour into pixel (i, j) with the given coverage in [0, 1]; outside the image does nothing. */
export function blendPixel(img: RgbImage, i: number, j: number, color: Rgb, coverage: number): void {
  if (i < 0 || j < 0 || i >= img.width || j >= img.height || !(coverage > 0)) return;
  const a = coverage >= 1 ? 1 : coverage;
  const k = 3 * (j * img.width + i);
  const d = img.data;
  d[k] = Math.round(d[k] + (color[0] - d[k]) * a);
  d[k + 1] = Math.round(d[k + 1] + (color[1] - d[k + 1]) * a);
  d[k + 2] = Math.round(d[k + 2] + (color[2] - d[k + 2]) * a);
}

/** Coverage of a pixel centre at distance `dist` from a shape's centre line drawn `halfWidth` wide. */
export function strokeCoverage(dist: number, halfWidth: number): number {
  const c = halfWidth + 0.5 - dist;
  return c <= 0 ? 0 : c >= 1 ? 1 : c;
}

/** Visits the pixels whose centres lie in the box, clipped to the image. */
function forBox(img: RgbImage, x0: number, y0: number, x1: number, y1: number, f: (i: number, j: number, x: number, y: number) => void): void {
  const i0 = Math.max(0, Math.floor(x0 - 1));
  const j0 = Math.max(0, Math.floor(y0 - 1));
  const i1 = Math.min(img.width - 1, Math.ceil(x1 + 1));
  const j1 = Math.min(img.height - 1, Math.ceil(y1 + 1));
  for (let j = j0; j <= j1; j++) for (let i = i0; i <= i1; i++) f(i, j, i + 0.5, j + 0.5);
}

/** A filled disc of radius r about (cx, cy). */
export function fillDisc(img: RgbImage, cx: number, cy: number, r: number, color: Rgb): void {
  forBox(img, cx - r, cy - r, cx + r, cy + r, (i, j, x, y) => blendPixel(img, i, j, color, strokeCoverage(Math.hypot(x - cx, y - cy) - r, 0)));
}

/** A circle of radius r about (cx, cy), drawn halfWidth either side of it. */
export function strokeRing(img: RgbImage, cx: number, cy: number, r: number, halfWidth: number, color: Rgb): void {
  const e = r + halfWidth;
  forBox(img, cx - e, cy - e, cx + e, cy + e, (i, j, x, y) => blendPixel(img, i, j, color, strokeCoverage(Math.abs(Math.hypot(x - cx, y - cy) - r), halfWidth)));
}

/** Distance from (x, y) to the segment from (x0, y0) to (x1, y1). */
export function segmentDistance(x: number, y: number, x0: number, y0: number, x1: number, y1: number): number {
  const dx = x1 - x0;
  const dy = y1 - y0;
  const l2 = dx * dx + dy * dy;
  const t = l2 > 0 ? Math.max(0, Math.min(1, ((x - x0) * dx + (y - y0) * dy) / l2)) : 0;
  return Math.hypot(x - x0 - t * dx, y - y0 - t * dy);
}

/** A segment with square-ish (round) ends, halfWidth either side. */
export function strokeSegment(img: RgbImage, x0: number, y0: number, x1: number, y1: number, halfWidth: number, color: Rgb): void {
  const e = halfWidth + 1;
  forBox(img, Math.min(x0, x1) - e, Math.min(y0, y1) - e, Math.max(x0, x1) + e, Math.max(y0, y1) + e, (i, j, x, y) =>
    blendPixel(img, i, j, color, strokeCoverage(segmentDistance(x, y, x0, y0, x1, y1), halfWidth)),
  );
}

/** A filled triangle (either winding). */
export function fillTriangle(img: RgbImage, a: readonly [number, number], b: readonly [number, number], c: readonly [number, number], color: Rgb): void {
  const area = (b[0] - a[0]) * (c[1] - a[1]) - (b[1] - a[1]) * (c[0] - a[0]);
  if (area === 0) return;
  const s = area > 0 ? 1 : -1;
  const edges: [readonly [number, number], readonly [number, number]][] = [
    [a, b],
    [b, c],
    [c, a],
  ];
  forBox(img, Math.min(a[0], b[0], c[0]), Math.min(a[1], b[1], c[1]), Math.max(a[0], b[0], c[0]), Math.max(a[1], b[1], c[1]), (i, j, x, y) => {
    // signed distance inside each edge; the smallest decides the coverage
    let inside = Infinity;
    for (const [p, q] of edges) {
      const ex = q[0] - p[0];
      const ey = q[1] - p[1];
      const d = (s * (ex * (y - p[1]) - ey * (x - p[0]))) / Math.hypot(ex, ey);
      inside = Math.min(inside, d);
    }
    blendPixel(img, i, j, color, strokeCoverage(-inside, 0));
  });
}
