/**
 * Dome-master images the project draws itself, for the demo and the tests: a star field, a smooth
 * colour card, and a fine checker that shows resolution loss. All in the fisheye convention of
 * DESIGN.md; pixels outside the fov circle are black.
 */
import { DEG } from '../math.js';
import { seededRandom } from '../random.js';
import type { ImageBuffer } from '../remap/types.js';

/**
 * A night sky: a faint horizon glow and `count` stars of random magnitude on the sphere, turned by
 * `turnDeg` about the zenith (successive frames of a slowly turning sky). RGB, 8-bit.
 */
export function starField(size: number, options: { seed?: number; count?: number; turnDeg?: number } = {}): ImageBuffer {
  const { seed = 7, count = 2500, turnDeg = 0 } = options;
  const data = new Uint8Array(size * size * 3);
  const c = size / 2;
  // sky glow: deep blue at the zenith, a warmer band near the horizon
  for (let j = 0; j < size; j++) {
    for (let i = 0; i < size; i++) {
      const r = Math.hypot(i + 0.5 - c, j + 0.5 - c) / c;
      if (r > 1) continue;
      const k = (j * size + i) * 3;
      const glow = Math.pow(r, 6);
      data[k] = Math.round(4 + 40 * glow);
      data[k + 1] = Math.round(6 + 22 * glow);
      data[k + 2] = Math.round(18 + 20 * glow);
    }
  }
  const rnd = seededRandom(seed);
  const turn = turnDeg * DEG;
  for (let s = 0; s < count; s++) {
    // uniform on the upper hemisphere
    const z = rnd();
    const az = rnd() * 2 * Math.PI + turn;
    const theta = Math.acos(z);
    const rho = (theta / Math.PI) * size; // radius in pixels: 0.5·θ/(π/2)·size
    const x = c + rho * Math.sin(az);
    const y = c + rho * Math.cos(az);
    const mag = Math.pow(rnd(), 3);
    const radius = 0.6 + 2.2 * mag * (size / 2048);
    const tint = rnd();
    const rgb = tint < 0.2 ? [255, 210, 170] : tint < 0.4 ? [180, 200, 255] : [255, 255, 250];
    const peak = 80 + 175 * mag;
    const x0 = Math.floor(x - radius - 1);
    const y0 = Math.floor(y - radius - 1);
    for (let yy = y0; yy <= y0 + 2 * radius + 2; yy++) {
      for (let xx = x0; xx <= x0 + 2 * radius + 2; xx++) {
        if (xx < 0 || yy < 0 || xx >= size || yy >= size) continue;
        const d = Math.hypot(xx + 0.5 - x, yy + 0.5 - y);
        const a = Math.exp(-(d * d) / (2 * radius * radius * 0.35));
        if (a < 0.02) continue;
        const k = (yy * size + xx) * 3;
        for (let ch = 0; ch < 3; ch++) data[k + ch] = Math.min(255, data[k + ch] + Math.round((peak * a * rgb[ch]) / 255));
      }
    }
  }
  return { width: size, height: size, channels: 3, data };
}

/** A smooth colour card: hue by azimuth, lightness by altitude; smooth enough for round-trip PSNR checks. */
export function smoothCard(size: number, sixteen = false): ImageBuffer {
  const n = size * size * 3;
  const data = sixteen ? new Uint16Array(n) : new Uint8Array(n);
  const max = sixteen ? 65535 : 255;
  const c = size / 2;
  for (let j = 0; j < size; j++) {
    for (let i = 0; i < size; i++) {
      const x = (i + 0.5 - c) / c;
      const y = (j + 0.5 - c) / c;
      const r = Math.hypot(x, y);
      const k = (j * size + i) * 3;
      const az = Math.atan2(x, y);
      const l = 0.25 + 0.6 * (1 - Math.min(1, r));
      data[k] = Math.round(max * Math.min(1, l * (0.6 + 0.4 * Math.cos(az))));
      data[k + 1] = Math.round(max * Math.min(1, l * (0.6 + 0.4 * Math.cos(az - 2.1))));
      data[k + 2] = Math.round(max * Math.min(1, l * (0.6 + 0.4 * Math.cos(az + 2.1))));
    }
  }
  return { width: size, height: size, channels: 3, data };
}

/** A dome-master grid: altitude rings every `ringDeg`, azimuth spokes every `spokeDeg`, on grey. */
export function gridCard(size: number, ringDeg = 10, spokeDeg = 15): ImageBuffer {
  const data = new Uint8Array(size * size * 3);
  const c = size / 2;
  const px = 90 / c; // degrees of zenith angle per pixel
  for (let j = 0; j < size; j++) {
    for (let i = 0; i < size; i++) {
      const x = i + 0.5 - c;
      const y = j + 0.5 - c;
      const r = Math.hypot(x, y);
      if (r > c) continue;
      const zen = r * px;
      const az = (Math.atan2(x, y) / DEG + 360) % 360;
      const ringDist = Math.abs(zen - Math.round(zen / ringDeg) * ringDeg) / px;
      const spokeDist = (Math.abs(az - Math.round(az / spokeDeg) * spokeDeg) * DEG) * r;
      const k = (j * size + i) * 3;
      const line = ringDist < 1.2 * (size / 1024) || spokeDist < 1.2 * (size / 1024);
      const front = az < 3 || az > 357;
      if (line) {
        data[k] = front ? 255 : 235;
        data[k + 1] = front ? 80 : 235;
        data[k + 2] = front ? 60 : 235;
      } else {
        data[k] = 30;
        data[k + 1] = 34;
        data[k + 2] = 44;
      }
    }
  }
  return { width: size, height: size, channels: 3, data };
}
