/** Order statistics for the report's figures: sort the finite values once, read many quantiles. */

export class Sorted {
  readonly values: Float64Array;
  constructor(a: ArrayLike<number>, keep?: (i: number) => boolean) {
    const v: number[] = [];
    for (let i = 0; i < a.length; i++) if (Number.isFinite(a[i]) && (keep === undefined || keep(i))) v.push(a[i]);
    this.values = Float64Array.from(v).sort();
  }
  get count(): number {
    return this.values.length;
  }
  /** The q-quantile (0..1), linear between order statistics; NaN when empty. */
  q(q: number): number {
    const v = this.values;
    if (v.length === 0) return Number.NaN;
    const pos = Math.min(v.length - 1, Math.max(0, q * (v.length - 1)));
    const lo = Math.floor(pos);
    const hi = Math.ceil(pos);
    return v[lo] + (v[hi] - v[lo]) * (pos - lo);
  }
  get min(): number {
    return this.values.length ? this.values[0] : Number.NaN;
  }
  get max(): number {
    return this.values.length ? this.values[this.values.length - 1] : Number.NaN;
  }
  get mean(): number {
    let s = 0;
    for (const x of this.values) s += x;
    return this.values.length ? s / this.values.length : Number.NaN;
  }
}

/**
 * The shortest arc of the circle (degrees) holding every azimuth given: [from, to] read clockwise
 * (increasing azimuth, wrapping at 360), or null for none. Largest empty gap removed.
 */
export function azimuthArc(azimuths: readonly number[]): [number, number] | null {
  if (azimuths.length === 0) return null;
  const a = azimuths.map((x) => ((x % 360) + 360) % 360).sort((p, q) => p - q);
  let gap = a[0] + 360 - a[a.length - 1];
  let from = a[0];
  let to = a[a.length - 1];
  for (let i = 1; i < a.length; i++) {
    if (a[i] - a[i - 1] > gap) {
      gap = a[i] - a[i - 1];
      from = a[i];
      to = a[i - 1];
    }
  }
  if (gap < 2) return [0, 360];
  return [from, to];
}

/** Rounds for JSON: a fixed number of significant decimals, NaN and ±∞ to null. */
export function roundFigure(x: number, digits = 4): number | null {
  if (!Number.isFinite(x)) return null;
  const v = Number(x.toFixed(digits));
  return Object.is(v, -0) ? 0 : v;
}
