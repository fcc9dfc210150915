/** Core notices carry their lengths in metres and name options, never flags or units; callers word them. */
import { describe, expect, it } from 'vitest';
import { notice, wordNotice } from '../src/notice.js';
import { formatLength } from '../src/units.js';
import { planRig } from '../src/placement/plan.js';
import { OptionError, RigError, deg, type Rig } from '../src/rig/model.js';

function rigWithoutFloor(): Rig {
  const s = Math.SQRT1_2;
  return {
    units: 'ft',
    dome: { radius: 2.5 },
    mirror: { center: [0, -1.95, 0.15], radius: 0.3, axis: [0, s, s], capAngle: deg(90) },
    projector: { position: [0, -1.3, 0.1], lookAt: [0, -1.95, 0.25], roll: 0, resolution: [640, 400], throwRatio: 1.6, lensShift: [0, 0] },
    content: { fov: deg(180), eye: [0, 0, 0] },
  };
}

describe('notices', () => {
  it('fills lengths in the caller units and options by the caller names, leaving unknown lengths as they are', () => {
    const n = notice('test.rule', 'keep {length:gap} clear, or set {option:gridSize}; {length:missing}', { lengths: { gap: 0.3048 } });
    expect(wordNotice(n, (m) => formatLength(m, 'ft'), (o) => `--${o}`)).toBe('keep 1 ft 0 in clear, or set --gridSize; {length:missing}');
    expect(wordNotice(n, (m) => `${m} m`, (o) => `the ${o} option`)).toBe('keep 0.3048 m clear, or set the gridSize option; {length:missing}');
  });

  it('the planner notes an assumed floor and body with their lengths in metres and no unit in the text', () => {
    const result = planRig(rigWithoutFloor(), { vary: ['projector.position.y'], evaluations: 20, keep: 1, vertices: 300, refineVertices: 300, reportVertices: 300 });
    const floor = result.notes.find((n) => n.rule === 'plan.floor-assumed')!;
    expect(floor.parameter).toBe('dome.floor');
    expect(floor.lengths?.depth).toBeCloseTo(1.25, 12); // half the dome radius, the planner's stand-in floor
    const body = result.notes.find((n) => n.rule === 'plan.body-assumed')!;
    expect(body.lengths).toEqual({ width: 0.35, length: 0.3, height: 0.15 });
    for (const n of result.notes) expect(n.text).not.toMatch(/--|\d\s*c?m\b/);
  });

  it('an option the planner cannot use is an OptionError naming the option, still a RigError', () => {
    const attempt = () => planRig(rigWithoutFloor(), { vary: ['dome.radius'], evaluations: 20 });
    expect(attempt).toThrow(OptionError);
    expect(attempt).toThrow(RigError);
    try {
      attempt();
    } catch (e) {
      expect((e as OptionError).option).toBe('vary');
      expect((e as OptionError).reason).toMatch(/^cannot vary "dome.radius"/);
    }
  });
});
