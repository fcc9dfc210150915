/**
 * A plain RGBA raster (8 bits per channel, sRGB-encoded, straight alpha) with the few drawing
 * operations the report's pictures need. Pure typed arrays: encoding to PNG happens in the CLI.
 */

export type Rgb8 = readonly [number, number, number];
export type Rgba8 = readonly [number, number, number, number];

export interface RasterImage {
  width: number;
  height: number;
  /** Row-major RGBA, 4 bytes per pixel, first row at the top. */
  data: Uint8ClampedArray;
}

export function createImage(width: number, height: number, background: Rgb8 | Rgba8 = [255, 255, 255]): RasterImage {
  const data = new Uint8ClampedArray(width * height * 4);
  const a = background.length === 4 ? background[3] : 255;
  for (let k = 0; k < width * height; k++) {
    data[4 * k] = background[0];
    data[4 * k + 1] = background[1];
    data[4 * k + 2] = background[2];
    data[4 * k + 3] = a;
  }
  return { width, height, data };
}

/**
 * Blends colour c over pixel (x, y) with coverage `alpha` in [0, 1] (source-over, in code values:
 * good enough for antialiased edges of thin lines and text). Pixels off the image are ignored.
 */
export function blendOver(img: RasterImage, x: number, y: number, c: Rgb8, alpha = 1): void {
  if (x < 0 || y < 0 || x >= img.width || y >= img.height || !(alpha > 0)) return;
  const k = 4 * ((y | 0) * img.width + (x | 0));
  const a = alpha > 1 ? 1 : alpha;
  const d = img.data;
  d[k] = d[k] + (c[0] - d[k]) * a;
  d[k + 1] = d[k + 1] + (c[1] - d[k + 1]) * a;
  d[k + 2] = d[k + 2] + (c[2] - d[k + 2]) * a;
  d[k + 3] = d[k + 3] + (255 - d[k + 3]) * a;
}

export function setPixel(img: RasterImage, x: number, y: number, c: Rgb8): void {
  if (x < 0 || y < 0 || x >= img.width || y >= img.height) return;
  const k = 4 * ((y | 0) * img.width + (x | 0));
  img.data[k] = c[0];
  img.data[k + 1] = c[1];
  img.data[k + 2] = c[2];
  img.data[k + 3] = 255;
}

/** Fills the axis-aligned rectangle [x, x+w) × [y, y+h), blended with `alpha`. */
export function fillRect(img: RasterImage, x: number, y: number, w: number, h: number, c: Rgb8, alpha = 1): void {
  const x0 = Math.max(0, Math.round(x));
  const y0 = Math.max(0, Math.round(y));
  const x1 = Math.min(img.width, Math.round(x + w));
  const y1 = Math.min(img.height, Math.round(y + h));
  for (let j = y0; j < y1; j++) for (let i = x0; i < x1; i++) blendOver(img, i, j, c, alpha);
}

export function strokeRect(img: RasterImage, x: number, y: number, w: number, h: number, c: Rgb8, width = 1): void {
  fillRect(img, x, y, w, width, c);
  fillRect(img, x, y + h - width, w, width, c);
  fillRect(img, x, y, width, h, c);
  fillRect(img, x + w - width, y, width, h, c);
}

/**
 * An antialiased line of the given width from (x0, y0) to (x1, y1), coordinates in pixels with pixel
 * centres at +0.5: each pixel near the segment gets coverage from its distance to the segment.
 * `dash` = [on, off] lengths in pixels for a dashed line.
 */
export function drawLine(img: RasterImage, x0: number, y0: number, x1: number, y1: number, c: Rgb8, width = 1, alpha = 1, dash?: [number, number]): void {
  const dx = x1 - x0;
  const dy = y1 - y0;
  const len2 = dx * dx + dy * dy;
  const half = width / 2;
  const pad = half + 1;
  const minX = Math.max(0, Math.floor(Math.min(x0, x1) - pad));
  const maxX = Math.min(img.width - 1, Math.ceil(Math.max(x0, x1) + pad));
  const minY = Math.max(0, Math.floor(Math.min(y0, y1) - pad));
  const maxY = Math.min(img.height - 1, Math.ceil(Math.max(y0, y1) + pad));
  if (!Number.isFinite(minX + maxX + minY + maxY)) return;
  const len = Math.sqrt(len2);
  for (let j = minY; j <= maxY; j++) {
    for (let i = minX; i <= maxX; i++) {
      const px = i + 0.5 - x0;
      const py = j + 0.5 - y0;
      let t = len2 > 0 ? (px * dx + py * dy) / len2 : 0;
      t = t < 0 ? 0 : t > 1 ? 1 : t;
      if (dash && len > 0) {
        const s = (t * len) % (dash[0] + dash[1]);
        if (s > dash[0]) continue;
      }
      const ex = px - t * dx;
      const ey = py - t * dy;
      const d = Math.sqrt(ex * ex + ey * ey);
      const cov = half + 0.5 - d; // a one-pixel ramp at the edge
      if (cov > 0) blendOver(img, i, j, c, alpha * (cov > 1 ? 1 : cov));
    }
  }
}

/** An antialiased polyline through the points [x0, y0, x1, y1, ...]. */
export function drawPolyline(img: RasterImage, pts: readonly number[], c: Rgb8, width = 1, alpha = 1, dash?: [number, number]): void {
  for (let k = 0; k + 3 < pts.length; k += 2) drawLine(img, pts[k], pts[k + 1], pts[k + 2], pts[k + 3], c, width, alpha, dash);
}

/** An antialiased filled disc of radius r centred at (cx, cy). */
export function fillCircle(img: RasterImage, cx: number, cy: number, r: number, c: Rgb8, alpha = 1): void {
  const x0 = Math.max(0, Math.floor(cx - r - 1));
  const x1 = Math.min(img.width - 1, Math.ceil(cx + r + 1));
  const y0 = Math.max(0, Math.floor(cy - r - 1));
  const y1 = Math.min(img.height - 1, Math.ceil(cy + r + 1));
  for (let j = y0; j <= y1; j++) {
    for (let i = x0; i <= x1; i++) {
      const d = Math.hypot(i + 0.5 - cx, j + 0.5 - cy);
      const cov = r + 0.5 - d;
      if (cov > 0) blendOver(img, i, j, c, alpha * (cov > 1 ? 1 : cov));
    }
  }
}

/** An antialiased circle outline (or an arc from angle a0 to a1, radians, measured clockwise from +x on screen). */
export function strokeCircle(img: RasterImage, cx: number, cy: number, r: number, c: Rgb8, width = 1, alpha = 1, a0 = 0, a1 = 2 * Math.PI, dash?: [number, number]): void {
  const n = Math.max(24, Math.ceil((Math.abs(a1 - a0) * r) / 3));
  const pts: number[] = [];
  for (let k = 0; k <= n; k++) {
    const a = a0 + ((a1 - a0) * k) / n;
    pts.push(cx + r * Math.cos(a), cy + r * Math.sin(a));
  }
  drawPolyline(img, pts, c, width, alpha, dash);
}

/** Fills a convex or concave polygon (even-odd rule) given as [x0, y0, x1, y1, ...], sampled at pixel centres. */
export function fillPolygon(img: RasterImage, pts: readonly number[], c: Rgb8, alpha = 1): void {
  const n = pts.length / 2;
  if (n < 3) return;
  let minY = Infinity;
  let maxY = -Infinity;
  for (let k = 0; k < n; k++) {
    minY = Math.min(minY, pts[2 * k + 1]);
    maxY = Math.max(maxY, pts[2 * k + 1]);
  }
  const y0 = Math.max(0, Math.floor(minY));
  const y1 = Math.min(img.height - 1, Math.ceil(maxY));
  const xs: number[] = [];
  for (let j = y0; j <= y1; j++) {
    const y = j + 0.5;
    xs.length = 0;
    for (let k = 0; k < n; k++) {
      const ax = pts[2 * k];
      const ay = pts[2 * k + 1];
      const bx = pts[(2 * k + 2) % (2 * n)];
      const by = pts[(2 * k + 3) % (2 * n)];
      if (ay <= y === by <= y) continue;
      xs.push(ax + ((y - ay) * (bx - ax)) / (by - ay));
    }
    xs.sort((a, b) => a - b);
    for (let m = 0; m + 1 < xs.length; m += 2) {
      for (let i = Math.max(0, Math.ceil(xs[m] - 0.5)); i <= Math.min(img.width - 1, Math.floor(xs[m + 1] - 0.5)); i++) blendOver(img, i, j, c, alpha);
    }
  }
}
