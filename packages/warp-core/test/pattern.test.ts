/**
 * Alignment patterns: the digit font reads back, shapes cover the area they should, the dome-master
 * grid sits where the fisheye convention (DESIGN.md) puts each direction, the front mark is at the
 * bottom, marker crosshairs centre on their continuous pixel coordinate, and a warped pattern puts the
 * zenith target on the projector pixel the inverse trace names for the zenith.
 */
import { describe, expect, it } from 'vitest';
import { createRgbImage, fillDisc, strokeRing, type RgbImage } from '../src/pattern/raster.js';
import { DEG, directionFromAzAlt } from '../src/math.js';
import { directionToFisheye } from '../src/optics/fisheye.js';
import { domeMasterPixel, drawDomePattern, PATTERN_COLORS } from '../src/pattern/dome-master.js';
import { drawMarkerFrame } from '../src/pattern/markers.js';
import { drawText, FONT_CHARACTERS, glyphCell, GLYPH_HEIGHT, GLYPH_WIDTH, textSize } from '../src/pattern/digit-font.js';
import { locateDirection } from '../src/locate.js';
import { pixelMapFromRig } from '../src/mesh/pixel-map.js';
import { remap } from '../src/remap/remap.js';
import { rigFromDocument } from '../src/rig/document.js';
import { Tracer } from '../src/trace.js';

const at = (img: RgbImage, i: number, j: number): [number, number, number] => {
  const k = 3 * (j * img.width + i);
  return [img.data[k], img.data[k + 1], img.data[k + 2]];
};
const lit = (img: RgbImage, i: number, j: number) => at(img, i, j).some((c) => c > 0);
const sum = (img: RgbImage) => img.data.reduce((s, c) => s + c, 0);

/** Reads text back from an image drawn by drawText at (left, top) with `scale`, by matching glyph cells. */
function readText(img: RgbImage, left: number, top: number, scale: number, count: number): string {
  let out = '';
  for (let n = 0; n < count; n++) {
    const cells: boolean[] = [];
    for (let row = 0; row < GLYPH_HEIGHT; row++) {
      for (let col = 0; col < GLYPH_WIDTH; col++) cells.push(lit(img, left + (n * (GLYPH_WIDTH + 1) + col) * scale + Math.floor(scale / 2), top + row * scale + Math.floor(scale / 2)));
    }
    const match = FONT_CHARACTERS.filter((ch) => cells.every((on, k) => glyphCell(ch, k % GLYPH_WIDTH, Math.floor(k / GLYPH_WIDTH)) === on));
    out += match.length === 1 ? match[0] : '?';
  }
  return out;
}

describe('digit font', () => {
  it('every glyph is different from every other', () => {
    const shapes = FONT_CHARACTERS.map((ch) => Array.from({ length: GLYPH_WIDTH * GLYPH_HEIGHT }, (_, k) => (glyphCell(ch, k % GLYPH_WIDTH, Math.floor(k / GLYPH_WIDTH)) ? '#' : '.')).join(''));
    expect(new Set(shapes).size).toBe(shapes.length);
  });

  it('drawn text reads back at several scales', () => {
    for (const scale of [1, 2, 5]) {
      const text = '0123456789-FRBL.';
      const [w, h] = textSize(text, scale);
      const img = createRgbImage(w + 4, h + 4);
      drawText(img, text, 2, 2, scale, [255, 255, 255]);
      expect(readText(img, 2, 2, scale, text.length)).toBe(text);
    }
  });

  it('refuses a character it does not have', () => {
    expect(() => drawText(createRgbImage(20, 10), 'Q', 0, 0, 1, [255, 255, 255])).toThrow('Expected one of');
  });
});

describe('raster shapes', () => {
  it('an anti-aliased disc covers about πr², a ring about 2πr·width', () => {
    const img = createRgbImage(200, 200);
    fillDisc(img, 100.3, 99.7, 40, [255, 0, 0]);
    expect(sum(img) / 255).toBeCloseTo(Math.PI * 40 * 40, -1);
    const ring = createRgbImage(200, 200);
    strokeRing(ring, 100, 100, 60, 1.5, [0, 255, 0]);
    expect(sum(ring) / 255 / (2 * Math.PI * 60 * 3)).toBeCloseTo(1, 1);
  });
});

describe('dome-master pattern', () => {
  const N = 512;
  const plain = drawDomePattern({ size: N, directionMarks: false, ringLabels: false, zenithTarget: false });

  it('places directions by the fisheye convention: front at the bottom, right on the right', () => {
    for (const [az, alt] of [
      [0, 30],
      [90, 0],
      [215, 62],
      [300, 5],
    ]) {
      const [x, y] = domeMasterPixel(N, Math.PI, az * DEG, alt * DEG);
      const [u, v] = directionToFisheye([0, 0], directionFromAzAlt(az * DEG, alt * DEG), Math.PI);
      expect(x).toBeCloseTo(u * N, 9);
      expect(y).toBeCloseTo(v * N, 9);
    }
    expect(domeMasterPixel(N, Math.PI, 0, 0)).toEqual([N / 2, N]);
    expect(domeMasterPixel(N, Math.PI, Math.PI / 2, 0)[0]).toBeCloseTo(N, 9);
  });

  it('draws rings at every 10° of altitude and nothing between them', () => {
    for (const alt of [20, 30, 50, 70]) {
      // at azimuth 15°, halfway between spokes
      const [x, y] = domeMasterPixel(N, Math.PI, 15 * DEG, alt * DEG);
      expect(lit(plain, Math.floor(x), Math.floor(y)), `ring ${alt}`).toBe(true);
      const [x2, y2] = domeMasterPixel(N, Math.PI, 15 * DEG, (alt + 5) * DEG);
      expect(lit(plain, Math.floor(x2), Math.floor(y2)), `between ${alt} and ${alt + 10}`).toBe(false);
    }
  });

  it('draws spokes every 30° of azimuth', () => {
    for (const az of [0, 30, 90, 240]) {
      const [x, y] = domeMasterPixel(N, Math.PI, az * DEG, 45 * DEG);
      expect(lit(plain, Math.floor(x), Math.floor(y)), `spoke ${az}`).toBe(true);
    }
    const [x, y] = domeMasterPixel(N, Math.PI, 45 * DEG, 45 * DEG);
    expect(lit(plain, Math.floor(x), Math.floor(y))).toBe(false);
  });

  it('without marks and labels the grid is mirror-symmetric left to right', () => {
    let differ = 0;
    for (let j = 0; j < N; j++) for (let i = 0; i < N / 2; i++) if (at(plain, i, j).join() !== at(plain, N - 1 - i, j).join()) differ++;
    expect(differ).toBe(0);
  });

  it('marks the front (amber) at the bottom and the zenith target at the centre', () => {
    const full = drawDomePattern({ size: N });
    const amber = (i: number, j: number) => at(full, i, j).join() === PATTERN_COLORS.front.join();
    let bottom = 0;
    let top = 0;
    for (let j = 0; j < N; j++) {
      for (let i = N / 2 - 30; i < N / 2 + 30; i++) {
        if (amber(i, j) && j > N * 0.75) bottom++;
        if (amber(i, j) && j < N * 0.25) top++;
      }
    }
    expect(bottom).toBeGreaterThan(50);
    expect(top).toBe(0);
    // the four pixels around the exact centre share its small disc: the target's hue, blue over red
    for (const [i, j] of [[N / 2 - 1, N / 2 - 1], [N / 2, N / 2 - 1], [N / 2 - 1, N / 2], [N / 2, N / 2]]) {
      const [r, , b] = at(full, i, j);
      expect(b - r).toBeGreaterThan(100);
    }
  });

  it('puts a numbered dot at its direction', () => {
    const img = drawDomePattern({ size: N, dots: [{ azimuth: 120 * DEG, altitude: 40 * DEG }] });
    const [x, y] = domeMasterPixel(N, Math.PI, 120 * DEG, 40 * DEG);
    expect(at(img, Math.floor(x), Math.floor(y))).toEqual([...PATTERN_COLORS.dot]);
  });

  it('a wider field of view moves the horizon inside the frame', () => {
    const wide = drawDomePattern({ size: N, fov: 220 * DEG, directionMarks: false, ringLabels: false, zenithTarget: false, spokeStep: 0 });
    const [x, y] = domeMasterPixel(N, 220 * DEG, 15 * DEG, 0);
    expect(at(wide, Math.floor(x), Math.floor(y))).toEqual([...PATTERN_COLORS.horizon]);
  });
});

describe('marker frames', () => {
  it('centres each crosshair on its continuous pixel coordinate and numbers it', () => {
    const img = drawMarkerFrame(320, 200, [{ x: 100.5, y: 80.5 }, { x: 316, y: 4 }], { arm: 20, lineWidth: 1 });
    expect(lit(img, 100, 80)).toBe(true); // the centre dot
    // the gap around the centre, then symmetric arms
    expect(lit(img, 100 + 3, 80)).toBe(false);
    for (const d of [8, 12, 18]) {
      expect(at(img, 100 + d, 80)).toEqual(at(img, 100 - d, 80));
      expect(at(img, 100, 80 + d)).toEqual(at(img, 100, 80 - d));
      expect(lit(img, 100 + d, 80)).toBe(true);
    }
    // the label "1" above-right of the ring (scale 1 for a 200-pixel frame)
    const left = Math.round(100.5 + 12 + 1);
    const top = Math.round(80.5 - 12 - 5 - 1);
    expect(readText(img, left, top, 1, 1)).toBe('1');
  });

  it('keeps labels of markers at the frame edge inside the frame', () => {
    const img = drawMarkerFrame(320, 200, [{ x: 316, y: 4, label: '27' }], { arm: 20, lineWidth: 1 });
    // flipped to the lower left of the ring
    const [w] = textSize('27', 1);
    expect(readText(img, Math.round(316 - 12 - 1 - w), Math.round(4 + 12 + 1), 1, 2)).toBe('27');
  });
});

describe('a warped pattern', () => {
  it('lights the projector pixel the inverse trace gives for the zenith with the zenith target', () => {
    // the demo rig at a quarter of its resolution, to keep the test quick
    const rig = rigFromDocument({
      units: 'm',
      dome: { diameter: 5, floor: 0.5 },
      mirror: { radius: 0.3, center: [0, -1.95, 0.15], axis: [0, 1, 1], capAngle: 90 },
      projector: { position: [0, -0.75, 0.1], lookAt: [0, -1.95, 0.25], roll: 0, resolution: [480, 300], throwRatio: 1.6, lensShift: [0, 0] },
    });
    const size = 512;
    const master = drawDomePattern({ size, lineWidth: 5 });
    const warped = remap(master, pixelMapFromRig(rig, [size, size], { brightness: 0 }), { filter: 'nearest' }) as RgbImage;
    // a point on the target's outer ring, off its cross: the ring's radius in the dome master, as an angle
    const targetRho = Math.min(0.045 * size, 10 * DEG * (size / 2 / (Math.PI / 2)) * 0.6);
    const zenithAngle = targetRho / (size / 2 / (Math.PI / 2));
    const onRing = locateDirection(new Tracer(rig), 45 * DEG, Math.PI / 2 - zenithAngle);
    if (!onRing.pixel) throw new Error('the demo rig lights the zenith');
    const [zx, zy] = onRing.pixel.map(Math.floor);
    let best = 0;
    for (let j = zy - 1; j <= zy + 1; j++) for (let i = zx - 1; i <= zx + 1; i++) best = Math.max(best, at(warped, i, j)[2] - at(warped, i, j)[0]);
    expect(best).toBeGreaterThan(100); // the target's cool blue: blue well above red
    // a pixel that misses the mirror stays black
    expect(at(warped, 2, 2)).toEqual([0, 0, 0]);
  });
});
