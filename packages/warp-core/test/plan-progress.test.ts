/** `planRig`'s optional progress callback: steps only go forward, end at the total, and change no answer. */
import { describe, expect, it } from 'vitest';
import { planTestRig } from './plan-rigs.js';
import type { Rig } from '../src/rig/model.js';
import { planRig } from '../src/placement/plan.js';

const rig = (): Rig => planTestRig({ position: [0, -1.3, 0.1], resolution: [1920, 1200] });

describe('plan progress', () => {
  it('reports steps done of a fixed total, never backwards, last at the total; the answer is the same without it', () => {
    const calls: [number, number][] = [];
    const settings = { vary: ['projector.position'], evaluations: 40, seed: 11, refineVertices: 2000, vertices: 500, reportVertices: 2000 };
    const watched = planRig(rig(), { ...settings, onProgress: (done, total) => calls.push([done, total]) });
    const plain = planRig(rig(), settings);
    expect(watched.best.map((c) => c.values)).toEqual(plain.best.map((c) => c.values));
    const total = calls[0][1];
    // the current rig's coarse score, the 40 scored candidates, 3 kept re-measured and the current re-measured
    expect(total).toBe(1 + 40 + 3 + 1);
    expect(calls.every(([, t]) => t === total)).toBe(true);
    for (let k = 1; k < calls.length; k++) expect(calls[k][0]).toBeGreaterThanOrEqual(calls[k - 1][0]);
    expect(calls.slice(0, -1).every(([done]) => done < total)).toBe(true);
    expect(calls.at(-1)).toEqual([total, total]);
    expect(calls.length).toBeGreaterThan(40);
  });
});
