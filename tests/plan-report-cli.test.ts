/**
 * `skyfold plan` and `skyfold report` agree: the figures plan prints for the rig it writes are the ones
 * report computes of that file (report's figures are `analyzeRig` of the rig it loads, at its --rays;
 * run here without report's pictures, which take most of its time).
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeRig } from '@skyfold/warp-core';
import { loadRig } from '@skyfold/warp-cli';
import { FIXTURES, skyfold, tempDir } from './support.js';
import { readFileSync as readText } from 'node:fs';

/** The deliberately poor placement with a small projector: plan has something to improve. */
const poorRig = (w: number, h: number) => readText(join(FIXTURES, 'poor-placement.yaml'), 'utf8').replace('resolution: [1920, 1200]', `resolution: [${w}, ${h}]`);

const dir = tempDir('plan-report');

describe('plan and report', () => {
  it("give the same figures for plan's best rig and the current one", async () => {
    writeFileSync(join(dir, 'rig.yaml'), poorRig(480, 300));
    const p = await skyfold(['plan', 'rig.yaml', '--vary', 'projector.position', '--evaluations', '40', '--rays', '6000', '-o', 'best.yaml', '--json'], { cwd: dir });
    expect(p.code, p.stderr).toBe(0);
    const plan = JSON.parse(p.stdout);
    for (const [file, figures] of [['best.yaml', plan.best[0].figures], ['rig.yaml', plan.current.figures]] as const) {
      const report = analyzeRig(loadRig(join(dir, file)).rig, { vertices: 6000, directions: { azimuths: 12, zenithSteps: 6 } }).figures;
      expect(figures.coverage).toBe(report.coverage.fraction);
      expect(figures.coverage).toBeLessThanOrEqual(1);
      expect(figures.median).toBe(report.resolution.median);
      expect(figures.p95).toBe(report.resolution.p95);
      expect(figures.pixelsLit).toBe(report.pixels.lit);
      expect(figures.focusNear).toBe(report.focus.depth.near);
      expect(figures.focusFar).toBe(report.focus.depth.far);
    }
  });
});
