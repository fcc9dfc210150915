/**
 * The floor is real (issue 12): a rig with `dome.floor` whose mirror, projector lens or projector body
 * stands below it is refused with the reason; parts resting on the floor are fine.
 */
import { describe, expect, it } from 'vitest';
import { bodyLowestZ, capLowestZ, RigError } from '../src/rig/model.js';
import { rigFromDocument } from '../src/rig/document.js';
import { normalize } from '../src/math.js';
import { bodyCorners } from '../src/analysis/body.js';
import { projectorFrame } from '../src/optics/projector.js';

type Doc = Record<string, any>;

/** The demo rig (fixtures/demo-rig.yaml) in metres: floor 0.5 m below the springline. */
function baseDoc(): Doc {
  return {
    units: 'm',
    dome: { radius: 2.5, floor: 0.5 },
    mirror: { radius: 0.25, center: [0, -1.95, 0.15], axis: [0, 1, 1], capAngle: 90 },
    projector: { position: [0, -0.75, 0.1], lookAt: [0, -1.95, 0.3], roll: 0, resolution: [1920, 1200], throwRatio: 1.6, lensShift: [0, 0] },
    content: { fov: 180 },
  };
}

function message(doc: unknown): string {
  try {
    rigFromDocument(doc);
  } catch (e) {
    expect(e).toBeInstanceOf(RigError);
    return (e as RigError).message;
  }
  throw new Error('expected a RigError, but the rig was accepted');
}

describe('the lowest point of the mirror cap', () => {
  it('a cap facing up: its rim; facing down: its pole; facing sideways: the rim, a radius down', () => {
    const m = (axis: [number, number, number], capAngle: number) => ({ center: [0, 0, 1] as [number, number, number], radius: 0.2, axis: normalize(axis), capAngle });
    expect(capLowestZ(m([0, 0, 1], Math.PI / 2))).toBeCloseTo(1, 15); // the rim circle at the centre's height
    expect(capLowestZ(m([0, 0, 1], Math.PI / 3))).toBeCloseTo(1 + 0.2 * Math.cos(Math.PI / 3), 15);
    expect(capLowestZ(m([0, 0, -1], 0.3))).toBeCloseTo(0.8, 15);
    expect(capLowestZ(m([0, 1, 0], Math.PI / 2))).toBeCloseTo(0.8, 15);
    // tilted 45° up with a hemisphere: the rim's lowest point is 0.2·cos 45° below the centre
    expect(capLowestZ(m([0, 1, 1], Math.PI / 2))).toBeCloseTo(1 - 0.2 * Math.SQRT1_2, 15);
  });
});

describe('a rig below its floor is refused with the reason', () => {
  it('the demo rig stands above its floor', () => {
    expect(() => rigFromDocument(baseDoc())).not.toThrow();
  });

  it('a mirror reaching below the floor', () => {
    const doc = baseDoc();
    doc.mirror.center = [0, -1.95, -0.4]; // rim 0.25·cos 45° = 0.177 m below: 0.077 m under the floor
    expect(message(doc)).toBe('mirror: the mirror reaches 0.077 m below the floor (dome.floor puts the floor 0.5 m below the springline): raise the mirror or check dome.floor');
  });

  it('a mirror resting on the floor is accepted', () => {
    const doc = baseDoc();
    doc.mirror.axis = [0, 0, 1];
    doc.mirror.center = [0, -1.95, -0.5]; // a hemisphere face up, its rim on the floor
    expect(() => rigFromDocument(doc)).not.toThrow();
  });

  it('a projector lens below the floor, in the rig file\'s feet and inches', () => {
    const doc = baseDoc();
    doc.units = 'ft';
    doc.dome = { diameter: '16 ft', floor: '1 ft 8 in' };
    doc.mirror = { radius: '10 in', center: ['0 in', '-6 ft', '6 in'], axis: [0, 1, 1] };
    doc.projector.position = ['0 in', '-2 ft', '-1 ft 9 in'];
    doc.projector.lookAt = ['0 in', '-6 ft', '10 in'];
    expect(message(doc)).toBe("projector.position: the projector's lens is 1 in below the floor (dome.floor puts the floor 1 ft 8 in below the springline): raise the projector or check dome.floor");
  });

  it("the projector's body below the floor", () => {
    const doc = baseDoc();
    doc.projector.position = [0, -0.75, -0.4];
    doc.projector.lookAt = [0, -1.95, 0.3];
    doc.projector.body = { width: 0.4, length: 0.3, height: 0.15 };
    // the lens 0.1 m above the floor; the box drops 0.075·cos + 0.3·sin of the tilt below it at the back
    const rig = rigFromDocument({ ...doc, projector: { ...doc.projector, body: undefined } });
    const low = bodyLowestZ(rig.projector, doc.projector.body);
    // the same lowest point from the body's eight corners (analysis/body.ts, the shadow test's box)
    expect(low).toBeCloseTo(Math.min(...bodyCorners(doc.projector.body, projectorFrame(rig.projector)).map((c) => c[2])), 14);
    expect(low).toBeLessThan(-0.5);
    expect(message(doc)).toBe(`projector.body: the projector's body reaches ${Number((-0.5 - low).toFixed(3))} m below the floor (dome.floor puts the floor 0.5 m below the springline): raise the projector, tilt it less, or check dome.floor`);
  });

  it('a rig without dome.floor is not checked against a floor', () => {
    const doc = baseDoc();
    delete doc.dome.floor;
    doc.mirror.center = [0, -1.95, -0.4];
    expect(() => rigFromDocument(doc)).not.toThrow();
  });
});
