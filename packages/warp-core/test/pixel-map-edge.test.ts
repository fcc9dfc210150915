/**
 * The exact per-pixel map (pixelMapFromRig, warp straight from a rig) uses the same mask ramp at the
 * exact edge as the bake (issue 11): its light factor is the per-pixel fields' brightness·mask, and a
 * pixel the edge crosses gets the share of it on the lit side, not the old all-or-nothing mask.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { litTest } from '../src/mesh/edge.js';
import { pixelSamples } from '../src/mesh/pixel-samples.js';
import { pixelMapFromRig } from '../src/mesh/pixel-map.js';
import { rigFromDocument } from '../src/rig/document.js';
import { Tracer } from '../src/trace.js';

const RIG = fileURLToPath(new URL('../../../fixtures/golden/warp-rig-320x200.yaml', import.meta.url));

describe('the per-pixel map from a rig', () => {
  const rig = rigFromDocument(parse(readFileSync(RIG, 'utf8')));
  const map = pixelMapFromRig(rig, [1024, 1024], { brightness: 0 });
  const W = map.width;
  const H = map.height;

  it('is lit by the mask ramp: brightness·mask of the per-pixel samples', () => {
    const f = pixelSamples(rig, { brightness: 1 });
    const withBrightness = pixelMapFromRig(rig, [1024, 1024], { brightness: 1 });
    let worst = 0;
    for (let k = 0; k < W * H; k++) worst = Math.max(worst, Math.abs(withBrightness.gain[k] - f.mask[k] * f.brightness[k]));
    expect(worst).toBeLessThan(1e-6);
  });

  it('gives the pixels the edge crosses a share between 0 and 1, and only those', () => {
    // without brightness the gain is the mask; the exact edge checked at the pixel's four corners
    const lit = litTest(new Tracer(rig));
    let partial = 0;
    let crossed = 0;
    for (let j = 0; j < H; j++)
      for (let i = 0; i < W; i++) {
        const g = map.gain[j * W + i];
        const corners = [lit(i, j), lit(i + 1, j), lit(i, j + 1), lit(i + 1, j + 1), lit(i + 0.5, j + 0.5)];
        const mixed = corners.some((x) => x) && corners.some((x) => !x);
        if (mixed) crossed++;
        if (g > 0 && g < 1) {
          partial++;
          // a ramp half a pixel wide each side: within one pixel of the edge, so a 3 × 3 block around it is mixed
          const near = [-1, 0, 1].some((dj) => [-1, 0, 1].some((di) => lit(i + 0.5 + di, j + 0.5 + dj) !== lit(i + 0.5, j + 0.5)));
          if (!near) expect.fail(`pixel ${i},${j}, gain ${g}, is more than a pixel from the edge`);
        } else if (!mixed) {
          // wholly on one side: all or nothing, as the trace says
          if (g !== (lit(i + 0.5, j + 0.5) ? 1 : 0)) expect.fail(`pixel ${i},${j} wholly on one side of the edge has gain ${g}`);
        }
      }
    expect(crossed).toBeGreaterThan(300);
    expect(partial).toBeGreaterThan(0.5 * crossed);
  });
});
