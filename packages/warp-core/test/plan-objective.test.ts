/** The plan's objective: four separate figures, documented weightings, and a small non-dominated set of candidates. */
import { describe, expect, it } from 'vitest';
import { planTestRig } from './plan-rigs.js';
import type { Rig } from '../src/rig/model.js';
import { dominates, planRig } from '../src/placement/plan.js';
import { OBJECTIVE_WEIGHTS, objectiveScore, PLAN_MEASURES, PLAN_OBJECTIVES } from '../src/placement/scoring.js';

const poor = (): Rig => planTestRig({ position: [0, -1.3, 0.1], lookAtZ: 0.15, resolution: [192, 120] });

describe('objectives', () => {
  it('weight the four figures, each weighting summing to 1', () => {
    for (const o of PLAN_OBJECTIVES) expect(PLAN_MEASURES.reduce((sum, m) => sum + OBJECTIVE_WEIGHTS[o][m], 0)).toBeCloseTo(1, 12);
    const f = { coverage: 0.9, sharpness: 0.5, uniformity: 0.1, efficiency: 0.2 };
    // the weighted geometric mean, by hand
    expect(objectiveScore('balanced', f)).toBeCloseTo(0.9 ** 0.7 * 0.5 ** 0.2 * 0.2 ** 0.1, 12);
    expect(objectiveScore('coverage', { ...f, coverage: 1 })).toBeGreaterThan(objectiveScore('coverage', f));
    expect(objectiveScore('balanced', { ...f, efficiency: null })).toBe(0);
  });

  it('dominance needs every figure at least as good and one better', () => {
    const a = { coverage: 0.9, sharpness: 0.5, uniformity: 0.1, efficiency: 0.2 } as never;
    expect(dominates({ ...(a as object), coverage: 0.95 } as never, a)).toBe(true);
    expect(dominates(a, a)).toBe(false);
    expect(dominates({ ...(a as object), coverage: 0.95, sharpness: 0.4 } as never, a)).toBe(false);
  });

  it('shows a few distinct candidates with their scores from their own figures, each labelled with what it leads', () => {
    const p = planRig(poor(), { vary: ['projector.position'], evaluations: 120, seed: 4, vertices: 400, refineVertices: 1500, reportVertices: 1500 });
    expect(p.best.length).toBeGreaterThan(1);
    for (const c of p.best) expect(c.figures.score!).toBeCloseTo(objectiveScore('balanced', c.figures), 3); // from figures rounded to 4 digits
    // every measure is led by exactly one shown candidate, the one with the highest figure
    for (const m of PLAN_MEASURES) {
      const leaders = p.best.filter((c) => c.bestFor.includes(m));
      expect(leaders).toHaveLength(1);
      expect(leaders[0].figures[m]).toBe(Math.max(...p.best.map((c) => c.figures[m] ?? 0)));
    }
    // the trade-offs shown keep most of the dome lit
    for (const c of p.best) expect(c.figures.coverage!).toBeGreaterThan(0.8 * p.current.figures.coverage!);
  });
});
