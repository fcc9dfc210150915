/** projector.aperture is the entrance pupil's diameter, a length; its errors say so. */
import { describe, expect, it } from 'vitest';
import { rigFromDocument } from '../src/rig/document.js';

function rig(aperture: unknown, units = 'm') {
  return rigFromDocument({
    units,
    dome: { radius: 2.5 },
    mirror: { radius: 0.3, center: [0, -1.95, 0.15], axis: [0, 1, 1] },
    projector: { position: [0, -0.75, 0.1], lookAt: [0, -1.95, 0.25], resolution: [1920, 1200], throwRatio: 1.6, aperture },
  });
}

const MEANING = `the diameter of the lens's entrance pupil, a length: its focal length divided by its f-number (a 20 mm lens at f/2: "10 mm"), not the f-number itself`;

describe('projector.aperture', () => {
  it('reads a length: "10 mm", "0.375 in", a bare number in the file units', () => {
    expect(rig('10 mm').projector.aperture).toBeCloseTo(0.01, 12);
    expect(rig('0.375 in').projector.aperture).toBeCloseTo(0.375 * 0.0254, 12);
    expect(rig(1.2, 'cm').projector.aperture).toBeCloseTo(0.012, 12);
  });

  it('refuses an f-number, saying what the field is', () => {
    expect(() => rig('f/2')).toThrow(`projector.aperture: expected ${MEANING}; got "f/2"`);
    expect(() => rig('F2.8')).toThrow(`projector.aperture: expected ${MEANING}; got "F2.8"`);
    // a bare 2 in a file in metres is a 2 m pupil: an f-number written in the wrong place
    expect(() => rig(2)).toThrow(`projector.aperture: 2 is wider than any projector lens: expected ${MEANING}`);
    expect(() => rig(-1)).toThrow(`projector.aperture: expected ${MEANING}; got -1`);
  });
});
