/**
 * Focus: a projector focuses on one plane, but the lit part of a curved mirror spreads over a depth.
 * Thin-lens geometry (optics handbook; common practice for depth of field): focused at axial distance
 * F, a point at axial depth z is blurred on the mirror into a disc of diameter c = a·|z − F|/F for an
 * entrance pupil of diameter a, which the lens sees at the angle c/z = a·|1/F − 1/z| — so the blur in
 * projector pixels is a·|1/F − 1/z|·W·T (one pixel spans 1/(W·T) radians on the axis). The focus that
 * makes the worst blur smallest is the harmonic mean of the nearest and farthest depths.
 */
import { formatLength } from '../units.js';
import type { FrameSample } from './sample.js';
import { HitKind } from '../trace.js';
import { roundFigure as r, Sorted } from './stats.js';

export interface FocusFigures {
  /** Lens-to-mirror distance along the rays of the lit pixels. */
  distance: { min: number | null; median: number | null; max: number | null };
  /** The same along the lens axis (what the focus ring sees): nearest, farthest and the depth between. */
  depth: { near: number | null; far: number | null; range: number | null };
  /** Best focus distance (along the axis). */
  bestFocus: number | null;
  aperture: number | null;
  minFocus: number | null;
  /** Blur with the best focus: projector pixels, and arcminutes on the dome. Null without an aperture. */
  blur: { pixelsMedian: number | null; pixelsP95: number | null; pixelsMax: number | null; arcminP95: number | null; arcminMax: number | null } | null;
  warnings: string[];
}

/** `vertexArcmin` gives arcminutes per pixel near each vertex (NaN where unknown). */
export function focusFigures(s: FrameSample, vertexArcmin: Float64Array, lengthText?: (metres: number, digits: number) => string): FocusFigures {
  const rig = s.tracer.rig;
  const f = s.tracer.frame;
  const n = s.cols * s.rows;
  const lit = (k: number) => s.kind[k] === HitKind.Lit;
  const axial = new Float64Array(n).fill(Number.NaN);
  for (let k = 0; k < n; k++) {
    if (!lit(k)) continue;
    const t = s.mirrorDistance[k];
    axial[k] = t * (s.ray[3 * k] * f.forward[0] + s.ray[3 * k + 1] * f.forward[1] + s.ray[3 * k + 2] * f.forward[2]);
  }
  const dist = new Sorted(s.mirrorDistance, lit);
  const depth = new Sorted(axial);
  const near = depth.min;
  const far = depth.max;
  const best = Number.isFinite(near) ? 2 / (1 / near + 1 / far) : Number.NaN;
  const aperture = rig.projector.aperture ?? null;
  const minFocus = rig.projector.minFocus ?? null;
  const warnings: string[] = [];
  const L = (m: number) => (lengthText ? lengthText(m, 3) : formatLength(m, rig.units));
  let blur: FocusFigures['blur'] = null;
  if (aperture !== null && Number.isFinite(best)) {
    const WT = f.width * f.throwRatio;
    const px = new Float64Array(n).fill(Number.NaN);
    const am = new Float64Array(n).fill(Number.NaN);
    for (let k = 0; k < n; k++) {
      if (!Number.isFinite(axial[k])) continue;
      px[k] = aperture * Math.abs(1 / best - 1 / axial[k]) * WT;
      am[k] = px[k] * vertexArcmin[k];
    }
    const P = new Sorted(px);
    const M = new Sorted(am);
    blur = { pixelsMedian: r(P.q(0.5), 3), pixelsP95: r(P.q(0.95), 3), pixelsMax: r(P.max, 3), arcminP95: r(M.q(0.95), 3), arcminMax: r(M.max, 3) };
    if (P.q(0.95) > 1) {
      warnings.push(`the mirror's depth blurs the picture by up to ${P.max.toFixed(1)} projector pixels even at the best focus (${L(best)}); a smaller lens aperture or a flatter part of the mirror helps`);
    }
  }
  if (minFocus !== null && Number.isFinite(near) && near < minFocus) {
    warnings.push(`the nearest lit part of the mirror is ${L(near)} from the lens, nearer than projector.minFocus (${L(minFocus)}): the projector cannot focus there; move the projector back or use a lens that focuses closer`);
  } else if (minFocus !== null && Number.isFinite(best) && best < minFocus) {
    warnings.push(`the best focus distance ${L(best)} is nearer than projector.minFocus (${L(minFocus)})`);
  }
  return {
    distance: { min: r(dist.min, 4), median: r(dist.q(0.5), 4), max: r(dist.max, 4) },
    depth: { near: r(near, 4), far: r(far, 4), range: r(far - near, 4) },
    bestFocus: r(best, 4),
    aperture,
    minFocus,
    blur,
    warnings,
  };
}
