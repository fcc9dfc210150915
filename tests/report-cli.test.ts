/**
 * `skyfold report` and `skyfold plan` as a user runs them, in-process on temporary files: the files, the
 * --json keys, the HTML page opened in headless Chromium (no console errors, every picture loaded),
 * and bad input refused with exit 2.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { chromium } from 'playwright-core';
import { parse } from 'yaml';
import { FIXTURES, skyfold as runSkyfold, tempDir, type Run } from './support.js';

const POOR = join(FIXTURES, 'poor-placement.yaml');
const CHROMIUM = '/usr/bin/chromium';
const HAVE_CHROMIUM = existsSync(CHROMIUM);
if (!HAVE_CHROMIUM) console.warn(`report page test skipped: no browser at ${CHROMIUM} (Debian's "chromium" package provides it)`);

function skyfold(cwd: string, ...args: string[]): Promise<Run> {
  return runSkyfold(args, { cwd });
}

const dir = tempDir('report');
let json: Record<string, any>;

beforeAll(async () => {
  expect((await skyfold(dir, 'init', '-o', 'demo.yaml')).code).toBe(0);
  const r = await skyfold(dir, 'report', 'demo.yaml', '-o', 'out', '--rays', '20000', '--json');
  expect(r.code, r.stderr).toBe(0);
  json = JSON.parse(r.stdout);
});

describe('skyfold report', () => {
  it('prints every figure under stable keys and writes the files', () => {
    for (const k of ['coverage', 'pixels', 'resolution', 'brightness', 'spill', 'focus', 'safety']) expect(json).toHaveProperty(k);
    expect(Math.abs(json.coverage.fraction - json.coverage.fractionByInverse)).toBeLessThan(0.005);
    for (const f of ['report.html', 'report.json', 'side-view.png', 'safety-plan.png', 'frame.png', 'resolution.png', 'brightness.png', 'placement-sweep.png']) {
      expect(existsSync(join(dir, 'out', f)), f).toBe(true);
    }
    expect(JSON.parse(readFileSync(join(dir, 'out', 'report.json'), 'utf8')).coverage.fraction).toBe(json.coverage.fraction);
  });

  it('makes a page that needs nothing from outside', () => {
    const html = readFileSync(join(dir, 'out', 'report.html'), 'utf8');
    expect(html).not.toMatch(/(src|href)="(https?:)?\/\//);
    expect(html).not.toMatch(/<script/);
    expect(html).toMatch(/Never look into the beam/);
    // five pictures of the rig and the placement sweep (issue 14)
    expect((html.match(/<figure>/g) ?? []).length).toBe(6);
    const pictures = (html.match(/<img src="data:image\/png;base64,/g) ?? []).length + (html.match(/<svg class="picture"/g) ?? []).length;
    expect(pictures).toBe(6);
  });

  it('refuses a missing output folder option and a bad rig with exit 2 and one line', async () => {
    const a = await skyfold(dir, 'report', 'demo.yaml');
    expect(a.code).toBe(2);
    const b = await skyfold(dir, 'report', 'nothing.yaml', '-o', 'x');
    expect(b.code).toBe(2);
    expect(b.stderr.trim().split('\n')).toHaveLength(1);
    expect(b.stderr).toMatch(/nothing\.yaml: cannot read the rig file: no such file/);
  });
});

describe.skipIf(!HAVE_CHROMIUM)('the report page in headless Chromium', () => {
  it('opens without errors and shows its pictures', async () => {
    const profile = mkdtempSync(join(tmpdir(), 'skyfold-chromium-')); // a fresh --user-data-dir
    const context = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM,
      headless: true,
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
      timeout: 60_000,
    });
    try {
      const page = await context.newPage();
      const errors: string[] = [];
      page.on('console', (m) => {
        if (m.type() === 'error') errors.push(m.text());
      });
      page.on('pageerror', (e) => errors.push(e.message));
      await page.goto(pathToFileURL(join(dir, 'out', 'report.html')).href, { waitUntil: 'load' });
      // each figure's picture is shown: a loaded <img>, or an inline SVG laid out with its embedded rasters decoded
      const widths = await page.$$eval('figure', (figs) =>
        Promise.all(
          figs.map(async (f) => {
            const img = f.querySelector('img');
            if (img) return img.complete && img.naturalWidth;
            const svg = f.querySelector('svg');
            if (!svg) return 0;
            for (const im of svg.querySelectorAll('image')) {
              const i = new Image();
              i.src = im.getAttribute('href') ?? '';
              await i.decode();
              if (!i.naturalWidth) return 0;
            }
            return svg.getBoundingClientRect().width;
          }),
        ),
      );
      expect(widths).toHaveLength(6); // five pictures of the rig and the placement sweep
      for (const w of widths) expect(w).toBeGreaterThan(0);
      expect(await page.title()).toMatch(/skyfold report/);
      expect(errors).toEqual([]);
    } finally {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    }
  });
});

describe('skyfold plan', () => {
  it('improves the deliberately poor placement and writes the best rig', async () => {
    const r = await skyfold(dir, 'plan', POOR, '--vary', 'projector.position', '--evaluations', '150', '--seed', '2', '--rays', '20000', '-o', 'best.yaml', '--json');
    expect(r.code, r.stderr).toBe(0);
    const p = JSON.parse(r.stdout);
    expect(p.best.length).toBeGreaterThan(0);
    expect(p.best[0].figures.score).toBeGreaterThan(p.current.figures.score);
    const doc = parse(readFileSync(join(dir, 'best.yaml'), 'utf8'));
    expect(doc.projector.position).toEqual(p.best[0].rig.projector.position);
    // the written rig is a rig skyfold reads
    expect((await skyfold(dir, 'probe', 'best.yaml', '--pixel', '960,600')).code).toBe(0);
  });

  it('refuses an unknown objective and an unknown field with exit 2', async () => {
    expect((await skyfold(dir, 'plan', POOR, '--objective', 'speed')).code).toBe(2);
    const b = await skyfold(dir, 'plan', POOR, '--vary', 'dome.radius');
    expect(b.code).toBe(2);
    expect(b.stderr).toMatch(/cannot vary "dome.radius"/);
  });
});
