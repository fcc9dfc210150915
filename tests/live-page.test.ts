/**
 * The live page (issue 17) in headless Chromium (Debian's, through playwright-core, WebGL 2 through
 * SwiftShader as in playback.test.ts): it loads with no console errors, reads the session, bakes the
 * rig in the browser with warp-core and draws the warped dome grid; the drawn frame is compared with
 * `skyfold warp` of the same grid image through the mesh `skyfold bake` makes of the same rig, with the
 * playback test's tolerances (mean < 2, 99th percentile < 8 code values away from the mask edge).
 *
 * The page is served by a small server in this file that follows the live contract (token on every
 * request, the page's HTML carrying it to the script): the HTML from livePageAssets(token).
 */
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { chromium, type Browser, type Page } from 'playwright-core';
import { bakeMesh, pixelMapFromMesh, remap, type ImageBuffer, type WarpMesh } from '@skyfold/warp-core';
import { loadRig, readGlb } from '@skyfold/warp-cli';
import { livePageAssets } from '../packages/warp-cli/dist/live/assets.js';
import { rigForPage } from '../packages/warp-cli/dist/live/server.js';
import { domeGrid } from '../packages/warp-cli/src/live/page/grid.js';
import { QUANTITIES } from '../packages/warp-cli/src/live/page/nudge.js';
import { DEMO_RIG, demoRigText, ROOT, skyfold } from './support.js';

/**
 * The README's picture (SKYFOLD_UPDATE_DOCS=1) is of the demo rig as it is, 1920 × 1200; the everyday run
 * uses the same rig with a 960 × 600 projector, a quarter of the pixels to bake, warp and compare.
 */
const UPDATE_DOCS = process.env.SKYFOLD_UPDATE_DOCS === '1';
let RIG = DEMO_RIG;

const CHROMIUM = '/usr/bin/chromium';
const HAVE_CHROMIUM = existsSync(CHROMIUM);
if (!HAVE_CHROMIUM) console.warn(`live page test skipped: no browser at ${CHROMIUM} (Debian's "chromium" package runs it)`);
const TOKEN = '0123456789abcdef0123456789abcdef';

/** A server that follows the live contract closely enough for the page: token checked, JSON session. */
async function contractServer(rigFile: string): Promise<{ server: Server; url: string }> {
  const loaded = await loadRig(rigFile);
  const session = JSON.stringify({ rigFile: 'demo-rig.yaml', units: loaded.rig.units, rig: rigForPage(loaded.rig), domeMesh: null, rigText: readFileSync(rigFile, 'utf8'), media: [] });
  const assets = await livePageAssets(TOKEN);
  const server = createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://x.invalid');
    if (url.searchParams.get('t') !== TOKEN) return res.writeHead(403).end();
    if (url.pathname === '/') return res.writeHead(200, { 'Content-Type': 'text/html; charset=utf-8', 'Content-Security-Policy': "default-src 'self'; img-src 'self' blob: data:; style-src 'self' 'unsafe-inline'" }).end(assets.html);
    if (url.pathname === '/app.js') return res.writeHead(200, { 'Content-Type': 'text/javascript; charset=utf-8' }).end(assets.js);
    if (url.pathname === '/api/session') return res.writeHead(200, { 'Content-Type': 'application/json' }).end(session);
    res.writeHead(404).end();
  });
  await new Promise<void>((ok) => server.listen(0, '127.0.0.1', ok));
  return { server, url: `http://127.0.0.1:${(server.address() as AddressInfo).port}/?t=${TOKEN}` };
}

/** 0 = a grid cell with all four vertices unlit, 1 = all four fully lit, 2 = the mask edge (playback.test.ts). */
function cellState(mesh: WarpMesh): Uint8Array {
  const { width: W, height: H } = mesh;
  const out = new Uint8Array(W * H);
  const sx = (mesh.cols - 1) / W;
  const sy = (mesh.rows - 1) / H;
  const m = mesh.mask;
  for (let j = 0; j < H; j++) {
    const r = Math.min(mesh.rows - 2, Math.floor((j + 0.5) * sy));
    for (let i = 0; i < W; i++) {
      const c = Math.min(mesh.cols - 2, Math.floor((i + 0.5) * sx));
      const k = r * mesh.cols + c;
      const q = [m[k], m[k + 1], m[k + mesh.cols], m[k + mesh.cols + 1]];
      out[j * W + i] = q.every((x) => x === 0) ? 0 : q.every((x) => x === 1) ? 1 : 2;
    }
  }
  return out;
}

/** Per-channel |a − b| over the chosen pixels (a RGBA, b RGB): mean, 99th percentile, max. */
function compare(a: Uint8Array, b: ImageBuffer, where: Uint8Array, aChannels = 4): { pixels: number; mean: number; p99: number; max: number } {
  const hist = new Float64Array(256);
  let sum = 0;
  let count = 0;
  let max = 0;
  for (let k = 0; k < where.length; k++) {
    if (!where[k]) continue;
    for (let ch = 0; ch < 3; ch++) {
      const d = Math.abs(a[k * aChannels + ch] - b.data[k * b.channels + ch]);
      hist[d]++;
      sum += d;
      count++;
      if (d > max) max = d;
    }
  }
  let acc = 0;
  let p99 = 0;
  for (let d = 0; d < 256; d++) {
    acc += hist[d];
    if (acc >= 0.99 * count) {
      p99 = d;
      break;
    }
  }
  return { pixels: count / 3, mean: sum / count, p99, max };
}

/** The mean of each pixel's 3 × 3 neighbourhood (clamped at the frame's edge), RGB out. */
function boxBlur(src: Uint8Array, channels: number, w: number, h: number): Uint8Array {
  const out = new Uint8Array(w * h * 3);
  for (let j = 0; j < h; j++)
    for (let i = 0; i < w; i++)
      for (let ch = 0; ch < 3; ch++) {
        let sum = 0;
        for (let dj = -1; dj <= 1; dj++)
          for (let di = -1; di <= 1; di++) {
            const ii = Math.min(w - 1, Math.max(0, i + di));
            const jj = Math.min(h - 1, Math.max(0, j + dj));
            sum += src[(jj * w + ii) * channels + ch];
          }
        out[(j * w + i) * 3 + ch] = Math.round(sum / 9);
      }
  return out;
}

/** Shrinks a mask by r pixels (a pixel stays when every pixel within r across and down is set). */
function erode(inside: Uint8Array, w: number, h: number, r: number): Uint8Array {
  const pass = (src: Uint8Array, dx: number, dy: number) => {
    const out = new Uint8Array(w * h);
    for (let j = 0; j < h; j++)
      for (let i = 0; i < w; i++) {
        let ok = 1;
        for (let d = -r; d <= r && ok; d++) {
          const ii = i + d * dx;
          const jj = j + d * dy;
          if (ii < 0 || jj < 0 || ii >= w || jj >= h || !src[jj * w + ii]) ok = 0;
        }
        out[j * w + i] = ok;
      }
    return out;
  };
  return pass(pass(inside, 1, 0), 0, 1);
}

export async function readFrame(page: Page): Promise<Uint8Array> {
  const b64 = await page.evaluate(async () => {
    const px = window.skyfoldLive!.pixels!();
    const gz = await new Response(new Blob([px]).stream().pipeThrough(new CompressionStream('gzip'))).arrayBuffer();
    let s = '';
    const u = new Uint8Array(gz);
    for (let i = 0; i < u.length; i += 0x8000) s += String.fromCharCode(...u.subarray(i, i + 0x8000));
    return btoa(s);
  });
  const { gunzipSync } = await import('node:zlib');
  return new Uint8Array(gunzipSync(Buffer.from(b64, 'base64')));
}

describe.skipIf(!HAVE_CHROMIUM)('skyfold live: the page in headless Chromium', () => {
  let dir: string;
  let browser: Browser | undefined;
  let server: Server | undefined;
  let page: Page;
  const problems: string[] = [];
  let webgl = true;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'skyfold-live-page-'));
    if (!UPDATE_DOCS) {
      RIG = join(dir, 'demo-rig.yaml');
      writeFileSync(RIG, demoRigText([960, 600]));
    }
    const launch = chromium.launch({
      executablePath: CHROMIUM,
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--use-gl=angle', '--use-angle=swiftshader', '--enable-unsafe-swiftshader'],
      timeout: 60_000,
    });
    const served = contractServer(RIG);
    const [b, s] = await Promise.allSettled([launch, served]);
    if (b.status === 'fulfilled') browser = b.value;
    if (s.status === 'fulfilled') server = s.value.server;
    if (b.status === 'rejected') throw b.reason;
    if (s.status === 'rejected') throw s.reason;
    page = await browser!.newPage();
    page.on('console', (m) => {
      // SwiftShader's notes on its own speed ("GL Driver Message (OpenGL, Performance, ...)") are not the page's
      if (m.type() === 'error' || (m.type() === 'warning' && !/GL Driver Message \(OpenGL, Performance/.test(m.text()))) problems.push(`${m.type()}: ${m.text()}`);
    });
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    page.on('requestfailed', (r) => problems.push(`request failed: ${r.url()}`));
    await page.goto(s.value.url);
    await page.waitForFunction(() => window.skyfoldLive?.ready === true || window.skyfoldLive?.error !== undefined, null, { timeout: 60_000 });
    const error = await page.evaluate(() => window.skyfoldLive?.error);
    if (error?.includes('WebGL 2')) {
      console.warn('live page test skipped: headless Chromium gives no WebGL 2 context');
      webgl = false;
    }
  }, 120_000);

  afterAll(async () => {
    await browser?.close();
    await new Promise((ok) => (server ? server.close(ok) : ok(undefined)));
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('loads with no console errors or warnings and draws frame after frame', async (ctx) => {
    if (!webgl) return ctx.skip();
    expect(await page.evaluate(() => window.skyfoldLive?.error)).toBeUndefined();
    expect(problems).toEqual([]);
    // the README's picture of the page on the demo rig (docs/live.png), taken by this run and written into
    // docs/ only when asked (SKYFOLD_UPDATE_DOCS=1), so that `npm test` leaves the tree clean (the
    // picture shows the measured bake time, which differs from run to run)
    const shot = await page.screenshot();
    expect((await sharp(shot).metadata()).width).toBeGreaterThan(0);
    if (UPDATE_DOCS) writeFileSync(join(ROOT, 'docs', 'live.png'), shot);
    const first = await page.evaluate(() => window.skyfoldLive!.frames!());
    await page.waitForFunction((n) => window.skyfoldLive!.frames!() > n + 2, first, { timeout: 30_000 });
  });

  it("draws the dome grid like `skyfold warp` of the same grid through `skyfold bake`'s mesh of the same rig", async (ctx) => {
    if (!webgl) return ctx.skip();
    const grid = domeGrid(2048, (await loadRig(RIG)).rig.content.fov);
    writeFileSync(join(dir, 'grid.png'), await sharp(Buffer.from(grid.data), { raw: { width: grid.width, height: grid.height, channels: 3 } }).png({ compressionLevel: 1 }).toBuffer());
    const bake = await skyfold(['bake', RIG, '-o', 'mesh.glb'], { cwd: dir });
    expect(bake.code, bake.stderr).toBe(0);
    const warp = await skyfold(['warp', 'mesh.glb', 'grid.png', '-o', 'out', '--filter', 'bilinear', '--jobs', '1'], { cwd: dir });
    expect(warp.code, warp.stderr).toBe(0);
    const cpuRaw = await sharp(join(dir, 'out', 'grid.png')).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    const cpu: ImageBuffer = { width: cpuRaw.info.width, height: cpuRaw.info.height, channels: 3, data: new Uint8Array(cpuRaw.data) };
    const mesh = await readGlb(new Uint8Array(readFileSync(join(dir, 'mesh.glb'))));
    const { width: W, height: H } = mesh;
    expect([cpu.width, cpu.height]).toEqual([W, H]);
    const frame = await readFrame(page);
    expect(frame.length).toBe(W * H * 4);
    const cells = cellState(mesh);
    const inside = erode(Uint8Array.from(cells, (s) => (s === 1 ? 1 : 0)), W, H, 3);
    const inner = compare(frame, cpu, inside);
    // The grid's lines are a few pixels wide with hard edges: where the GPU's two affine triangles per
    // cell and the CPU's bilinear cell place an edge a fraction of a pixel apart, one pixel differs by
    // much of the line's brightness. Judged as the playback test judges its smooth card, after a 3 × 3
    // box blur of both (a sub-pixel shift is then a few code values, a line out of place is not).
    const blurred = compare(boxBlur(frame, 4, W, H), { ...cpu, data: boxBlur(cpu.data, 3, W, H) }, inside, 3);
    let lightInDark = 0;
    let gridLit = 0;
    for (let k = 0; k < W * H; k++) {
      const lit = frame[k * 4] || frame[k * 4 + 1] || frame[k * 4 + 2];
      if (cells[k] === 0 && lit) lightInDark++;
      if (inside[k] && frame[k * 4] > 100) gridLit++;
    }
    console.log(`live page grid: inside ${inner.pixels} px: mean |page − warp| ${inner.mean.toFixed(3)}, p99 ${inner.p99}, max ${inner.max}; 3 × 3 blurred: mean ${blurred.mean.toFixed(3)}, p99 ${blurred.p99}, max ${blurred.max}; light in unlit cells ${lightInDark} px; grid lines ${gridLit} px`);
    expect(inner.pixels).toBeGreaterThan(0.3 * W * H);
    expect(gridLit).toBeGreaterThan(0.005 * inner.pixels); // the grid is there, not a black frame matching black
    expect(inner.mean).toBeLessThan(2);
    expect(blurred.mean).toBeLessThan(2);
    expect(blurred.p99).toBeLessThan(8);
    expect(lightInDark).toBe(0);
  });

  it('a nudge of the aim moves the drawn grid as the nudged rig predicts, and undo brings it back', async (ctx) => {
    if (!webgl) return ctx.skip();
    const loaded = (await loadRig(RIG)).rig;
    const before = await readFrame(page);
    const turn = QUANTITIES.findIndex((q) => q.id === 'aim-turn');
    for (let i = 0; i < turn; i++) await page.keyboard.press(']');
    await page.keyboard.press('ArrowRight');
    await page.keyboard.press('ArrowRight');
    const q = QUANTITIES[turn];
    const expected = q.apply(q.apply(loaded, q.step), q.step);
    const rig = await page.evaluate(() => window.skyfoldLive!.rig!());
    for (let k = 0; k < 3; k++) expect(rig.projector.lookAt[k]).toBeCloseTo(expected.projector.lookAt[k], 12);
    expect(rig.projector.position).toEqual(loaded.projector.position);
    expect(await page.locator('#panel .change').allTextContents()).toEqual(['aim, turn +1.00°']);
    const after = await readFrame(page);
    const full = await page.evaluate(() => window.skyfoldLive!.state!.lastBake);
    // a held key: the page bakes the coarse grid on every repeat, the full one when the key is let go
    await page.keyboard.down('ArrowLeft');
    await page.keyboard.down('ArrowLeft');
    const held = await page.evaluate(() => window.skyfoldLive!.state!.lastBake);
    await page.keyboard.up('ArrowLeft');
    const released = await page.evaluate(() => window.skyfoldLive!.state!.lastBake);
    console.log(`live page bake in headless Chromium (figures, not asserted): full ${full.cols} × ${full.rows} in ${full.ms.toFixed(0)} ms; key held: ${held.cols} × ${held.rows} in ${held.ms.toFixed(0)} ms`);
    expect(held.coarse).toBe(true);
    expect(released.coarse).toBe(false);
    await page.keyboard.press('u');
    await page.keyboard.press('u');
    // the CPU's warp of the same grid through the nudged rig's mesh
    const mesh = bakeMesh(expected).mesh;
    const { width: W, height: H } = mesh;
    const grid = domeGrid(2048, loaded.content.fov);
    const cpu = remap(grid, pixelMapFromMesh(mesh, [grid.width, grid.height]), { filter: 'bilinear' });
    const inside = erode(Uint8Array.from(cellState(mesh), (s) => (s === 1 ? 1 : 0)), W, H, 3);
    const moved = compare(after, cpu, inside);
    const blurred = compare(boxBlur(after, 4, W, H), { ...cpu, data: boxBlur(cpu.data, 3, W, H) }, inside, 3);
    const stale = compare(boxBlur(before, 4, W, H), { ...cpu, data: boxBlur(cpu.data, 3, W, H) }, inside, 3);
    console.log(`live page nudge (aim +1°): mean |page − nudged warp| ${moved.mean.toFixed(3)}, blurred p99 ${blurred.p99}; the frame before the nudge against it: mean ${stale.mean.toFixed(3)}, p99 ${stale.p99}`);
    expect(moved.mean).toBeLessThan(2);
    expect(blurred.p99).toBeLessThan(8);
    expect(stale.p99).toBeGreaterThan(blurred.p99 + 8); // the picture did move
    await page.keyboard.press('u');
    await page.keyboard.press('u');
    const back = await page.evaluate(() => window.skyfoldLive!.rig!());
    expect(back.projector.lookAt).toEqual(loaded.projector.lookAt);
    expect(await page.locator('#panel .change').count()).toBe(0);
  });
});
