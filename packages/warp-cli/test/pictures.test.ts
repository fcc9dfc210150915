/**
 * The pictures: the typeface, the label placer, the colour map, and the report's pictures themselves
 * read as SVG — what their labels say, that no two labels overlap nor cover a kept-clear line, and
 * that the PNG sharp renders has the picture's stated size.
 */
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { analyzeRig, type RigAnalysis } from '@skyfold/warp-core';
import { loadRig } from '../src/io/document-file.js';
import { dusk, oklabLightness } from '../src/pictures/colormap.js';
import { boxesOverlap, boxHitsObstacle, placeLabel } from '../src/pictures/label-placer.js';
import { svgToPng } from '../src/pictures/render.js';
import { reportPictures } from '../src/pictures/report-pictures.js';
import { SvgPicture, type Picture } from '../src/pictures/svg.js';
import { hasGlyph, textWidth } from '../src/pictures/typeface.js';

const fixture = (name: string) => fileURLToPath(new URL(`../../../fixtures/${name}`, import.meta.url));

/** The labels as the SVG document holds them: data-label text and data-box "x y w h". */
function svgLabels(svg: string): { text: string; box: { x: number; y: number; w: number; h: number } }[] {
  const unescape = (s: string) => s.replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&');
  return [...svg.matchAll(/data-label="([^"]*)" data-box="([^"]*)"/g)].map((m) => {
    const [x, y, w, h] = m[2].split(' ').map(Number);
    return { text: unescape(m[1]), box: { x, y, w, h } };
  });
}

describe('typeface and colour', () => {
  it('has a glyph for every letter, digit and the signs the labels use', () => {
    for (const ch of 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789°%.,:;-+/()×–′') expect(hasGlyph(ch), ch).toBe(true);
  });

  it('measures text by the font: wider for more letters, proportional to size', () => {
    expect(textWidth('eyes', 12)).toBeGreaterThan(textWidth('eye', 12));
    expect(textWidth('azimuth 180°', 24)).toBeCloseTo(2 * textWidth('azimuth 180°', 12), 9);
    expect(textWidth('W', 12)).toBeGreaterThan(textWidth('i', 12)); // proportional, not a fixed cell
  });

  it('"dusk" rises in OKLab lightness from end to end', () => {
    let prev = -1;
    for (let k = 0; k <= 64; k++) {
      const L = oklabLightness(dusk(k / 64));
      expect(L).toBeGreaterThan(prev);
      prev = L;
    }
  });
});

describe('label placer', () => {
  it('tells boxes from segments and rings', () => {
    const b = { x: 10, y: 10, w: 20, h: 10 };
    expect(boxesOverlap(b, { x: 29, y: 19, w: 5, h: 5 })).toBe(true);
    expect(boxesOverlap(b, { x: 30, y: 10, w: 5, h: 5 })).toBe(false); // touching edges do not overlap
    expect(boxHitsObstacle(b, { kind: 'segment', x1: 0, y1: 0, x2: 40, y2: 40, width: 1 })).toBe(true);
    expect(boxHitsObstacle(b, { kind: 'segment', x1: 0, y1: 25, x2: 40, y2: 25, width: 1 })).toBe(false);
    expect(boxHitsObstacle(b, { kind: 'segment', x1: 0, y1: 25, x2: 40, y2: 25, width: 11 })).toBe(true); // its width reaches the box
    expect(boxHitsObstacle(b, { kind: 'circle', cx: 20, cy: 15, r: 100, width: 1 })).toBe(false); // the box is well inside the ring
    expect(boxHitsObstacle(b, { kind: 'circle', cx: 20, cy: 15, r: 8, width: 1 })).toBe(true); // the ring runs through it
    expect(boxHitsObstacle(b, { kind: 'circle', cx: 0, cy: 0, r: 5, width: 1 })).toBe(false); // the box is outside the ring
  });

  it('takes the next candidate when the first would cover a label or a kept-clear line', () => {
    const pic = new SvgPicture(300, 200, 't', 'test');
    const first = pic.text('azimuth 180°', 100, 100, { size: 12 });
    pic.keepClear.push({ kind: 'segment', x1: 0, y1: 150, x2: 300, y2: 150, width: 1 });
    const b = placeLabel(pic, 'eyes 2 ft', { size: 12 }, [{ x: 100, y: 100 }, { x: 100, y: 150, baseline: 'middle' }, { x: 100, y: 60 }]);
    expect(boxesOverlap(b, first)).toBe(false);
    expect(b.y + b.h).toBeLessThanOrEqual(64);
    expect(pic.labels.map((l) => l.text)).toEqual(['azimuth 180°', 'eyes 2 ft']);
  });
});

describe('the report pictures', () => {
  let feet: RigAnalysis;
  let metric: RigAnalysis;
  const pictures: Record<string, Picture[]> = {};

  beforeAll(async () => {
    feet = analyzeRig(loadRig(fixture('demo-rig-ft.yaml')).rig, { vertices: 8000, directions: { azimuths: 72, zenithSteps: 30, reportEvery: 1 } });
    metric = analyzeRig(loadRig(fixture('demo-rig.yaml')).rig, { vertices: 8000, directions: { azimuths: 72, zenithSteps: 30, reportEvery: 1 } });
    for (const [name, a] of [['feet', feet], ['metric', metric]] as const) pictures[name] = Object.values(await reportPictures(a, 240)).filter((p): p is Picture => p !== null && 'svg' in p);
  });

  it('draws every label clear of the others and of the lines it annotates', () => {
    for (const [rig, list] of Object.entries(pictures))
      for (const p of list) {
        const labels = svgLabels(p.svg);
        expect(labels.length).toBe(p.labels.length);
        for (let i = 0; i < labels.length; i++) {
          const a = labels[i];
          expect(a.box.x >= -0.1 && a.box.y >= -0.1 && a.box.x + a.box.w <= p.width + 0.1 && a.box.y + a.box.h <= p.height + 0.1, `${rig}: "${a.text}" inside the picture`).toBe(true);
          for (let j = i + 1; j < labels.length; j++) expect(boxesOverlap(a.box, labels[j].box), `${rig}: "${a.text}" / "${labels[j].text}"`).toBe(false);
        }
        for (const l of p.labels) for (const o of p.keepClear) expect(boxHitsObstacle(l.box, o), `${rig}: "${l.text}" over a ${o.kind}`).toBe(false);
      }
  });

  it('renders to a PNG of the stated size', async () => {
    for (const p of pictures.feet) {
      expect(p.svg).toMatch(new RegExp(`^<svg [^>]*width="${p.width}" height="${p.height}"`));
      const meta = await sharp(await svgToPng(p.svg)).metadata();
      expect([meta.width, meta.height]).toEqual([p.width, p.height]);
    }
  });
});
