/**
 * Brightness uniformity (DESIGN.md "Brightness"): a Lambertian dome's luminance goes as 1/A, A the dome
 * area one projector pixel lights. Figures before and after the compensation b = (A/A_max)^s clipped
 * to [floor, 1], with robust ends (1st and 99th percentiles of the lit pixels).
 */
import { BAKE_DEFAULTS } from '../mesh/bake.js';
import type { CellMeasures } from './sample.js';
import { roundFigure as r, Sorted } from './stats.js';

export interface BrightnessFigures {
  /** Brightest ÷ dimmest lit patch before compensation (99th ÷ 1st percentile of 1/A). */
  ratioBefore: number | null;
  /** The same over every lit cell, stray ones included. */
  ratioBeforeExtreme: number | null;
  /** Brightest ÷ dimmest after compensation with the bake defaults. */
  ratioAfter: number | null;
  /** Share of the lit pixels' light the compensation removes (1 − mean b). */
  lightLost: number | null;
  /** Share of lit pixels held at the floor factor (the compensation cannot dim the brightest further). */
  atFloor: number | null;
  strength: number;
  floor: number;
  /** The reference area A_max, m² of dome per projector pixel (99th percentile). */
  areaMax: number | null;
  /** The smallest patch (1st percentile), the brightest. */
  areaMin: number | null;
}

export function brightnessFigures(cells: CellMeasures, strength = BAKE_DEFAULTS.brightness, floor = BAKE_DEFAULTS.brightnessFloor): BrightnessFigures {
  const A = new Sorted(cells.areaPerPixel);
  const aMax = A.q(0.99);
  const aMin = A.q(0.01);
  const after: number[] = [];
  let sumB = 0;
  let atFloor = 0;
  for (const a of A.values) {
    let b = Math.pow(a / aMax, strength);
    if (b <= floor) {
      b = floor;
      atFloor++;
    }
    if (b > 1) b = 1;
    sumB += b;
    after.push(b / a);
  }
  const L = new Sorted(after);
  const n = A.count;
  return {
    ratioBefore: r(aMax / aMin, 3),
    ratioBeforeExtreme: r(A.max / A.min, 3),
    ratioAfter: r(L.q(0.99) / L.q(0.01), 3),
    lightLost: n ? r(1 - sumB / n, 4) : null,
    atFloor: n ? r(atFloor / n, 4) : null,
    strength,
    floor,
    areaMax: r(aMax, 10),
    areaMin: r(aMin, 10),
  };
}
