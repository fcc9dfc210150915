/**
 * The quantities an operator nudges while watching the dome: each a small change of the rig, in metres
 * or radians inside, shown in the rig's own units. A step is the coarse one, a tenth with Shift, a
 * hundredth with Alt.
 */
import { DEG, formatLength, isLengthUnit, type Rig } from '@skyfold/warp-core';

type Kind = 'length' | 'angle' | 'ratio';

export interface Quantity {
  id: string;
  label: string;
  kind: Kind;
  /** Coarse step: metres, radians or a plain number. */
  step: number;
  /** A copy of the rig with the quantity changed by `delta`. */
  apply(rig: Rig, delta: number): Rig;
}

const copy = (rig: Rig): Rig => ({
  ...rig,
  mirror: { ...rig.mirror, center: [...rig.mirror.center] as Rig['mirror']['center'] },
  projector: { ...rig.projector, position: [...rig.projector.position] as Rig['projector']['position'], lookAt: [...rig.projector.lookAt] as Rig['projector']['lookAt'], lensShift: [...rig.projector.lensShift] as [number, number] },
});

const along = (part: 'mirror' | 'projector', axis: 0 | 1 | 2, label: string): Quantity => ({
  id: `${part}-${'xyz'[axis]}`,
  label,
  kind: 'length',
  step: 0.01,
  apply(rig, d) {
    const r = copy(rig);
    if (part === 'mirror') r.mirror.center[axis] += d;
    else {
      // the projector moves with its aim: lens and aim point together
      r.projector.position[axis] += d;
      r.projector.lookAt[axis] += d;
    }
    return r;
  },
});

/** Turns the aim point about the lens: `yaw` about the world's vertical, else tilts it up (positive) or down. */
function turnAim(rig: Rig, d: number, yaw: boolean): Rig {
  const r = copy(rig);
  const p = r.projector.position;
  const f = [r.projector.lookAt[0] - p[0], r.projector.lookAt[1] - p[1], r.projector.lookAt[2] - p[2]];
  const len = Math.hypot(f[0], f[1], f[2]);
  let az = Math.atan2(f[1], f[0]);
  let el = Math.asin(Math.max(-1, Math.min(1, f[2] / len)));
  if (yaw) az += d;
  else el = Math.max(-89.9 * DEG, Math.min(89.9 * DEG, el + d));
  r.projector.lookAt = [p[0] + len * Math.cos(el) * Math.cos(az), p[1] + len * Math.cos(el) * Math.sin(az), p[2] + len * Math.sin(el)];
  return r;
}

export const QUANTITIES: readonly Quantity[] = [
  along('mirror', 0, 'mirror centre x'),
  along('mirror', 1, 'mirror centre y'),
  along('mirror', 2, 'mirror centre z'),
  along('projector', 0, 'projector x'),
  along('projector', 1, 'projector y'),
  along('projector', 2, 'projector z'),
  { id: 'aim-turn', label: 'aim, turn', kind: 'angle', step: 0.5 * DEG, apply: (rig, d) => turnAim(rig, d, true) },
  { id: 'aim-tilt', label: 'aim, tilt', kind: 'angle', step: 0.5 * DEG, apply: (rig, d) => turnAim(rig, d, false) },
  { id: 'roll', label: 'roll', kind: 'angle', step: 0.5 * DEG, apply: (rig, d) => ({ ...copy(rig), projector: { ...copy(rig).projector, roll: rig.projector.roll + d } }) },
  { id: 'throw', label: 'throw ratio', kind: 'ratio', step: 0.01, apply: (rig, d) => ({ ...copy(rig), projector: { ...copy(rig).projector, throwRatio: Math.max(0.05, rig.projector.throwRatio + d) } }) },
  { id: 'shift-x', label: 'lens shift across', kind: 'ratio', step: 0.01, apply: (rig, d) => { const r = copy(rig); r.projector.lensShift[0] += d; return r; } },
  { id: 'shift-y', label: 'lens shift up', kind: 'ratio', step: 0.01, apply: (rig, d) => { const r = copy(rig); r.projector.lensShift[1] += d; return r; } },
];

/** The step for the modifier keys held: a tenth with Shift, a hundredth with Alt. */
export function stepFor(q: Quantity, mods: { shiftKey?: boolean; altKey?: boolean }): number {
  return q.step * (mods.altKey ? 0.01 : mods.shiftKey ? 0.1 : 1);
}

/** A change shown in the rig's units: lengths by warp-core's formatting, angles in degrees. */
export function formatAmount(kind: Kind, value: number, units: string): string {
  if (kind === 'length') return formatLength(value, isLengthUnit(units) ? units : 'm');
  if (kind === 'angle') return `${(value / DEG).toFixed(2)}°`;
  return value.toFixed(3);
}

/** The rig's loaded state and every nudge since, for undo, reset and the readout. */
export class NudgeLog {
  private done: { q: Quantity; delta: number }[] = [];
  constructor(readonly base: Rig) {}

  get rig(): Rig {
    return this.done.reduce((r, n) => n.q.apply(r, n.delta), this.base);
  }
  push(q: Quantity, delta: number): void {
    this.done.push({ q, delta });
  }
  undo(): boolean {
    return this.done.pop() !== undefined;
  }
  reset(): void {
    this.done = [];
  }
  /** Net change per quantity since load (zero totals left out). */
  totals(): { q: Quantity; total: number }[] {
    const sums = new Map<Quantity, number>();
    for (const n of this.done) sums.set(n.q, (sums.get(n.q) ?? 0) + n.delta);
    return [...sums].filter(([, t]) => Math.abs(t) > 1e-12).map(([q, total]) => ({ q, total }));
  }
}
