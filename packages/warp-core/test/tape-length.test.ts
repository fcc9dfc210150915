/**
 * Lengths written as a tape reads them (issue 12, `--fractions`): feet and inches to the nearest
 * sixteenth of an inch, the fraction in lowest terms, read back exactly by parseLengthString.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { formatTapeLength, parseLengthString } from '../src/units.js';

// 1 in = 0.0254 m and 1 ft = 0.3048 m exactly (the international yard and pound agreement, 1959)
const IN = 0.0254;

describe('formatTapeLength', () => {
  it('writes the tape readings of the issue, in lowest terms', () => {
    expect(formatTapeLength((9 * 12 + 1.5) * IN, 'ft')).toBe('9 ft 1 1/2 in');
    expect(formatTapeLength(0.75 * IN, 'ft')).toBe('3/4 in');
    expect(formatTapeLength((5 * 12 + 3.25) * IN, 'ft')).toBe('5 ft 3 1/4 in');
    expect(formatTapeLength((2 * 12 + 7 / 16) * IN, 'ft')).toBe('2 ft 7/16 in');
    expect(formatTapeLength(24 * IN, 'ft')).toBe('2 ft 0 in');
    expect(formatTapeLength(31.5 * IN, 'in')).toBe('31 1/2 in');
    expect(formatTapeLength(0, 'ft')).toBe('0 in');
  });

  it('rounds to the nearest sixteenth, carrying into the inch and the foot', () => {
    expect(formatTapeLength(33.4675 * IN, 'ft')).toBe('2 ft 9 7/16 in'); // 0.4675 in is 7.48 sixteenths
    expect(formatTapeLength(11.98 * IN, 'ft')).toBe('1 ft 0 in'); // 11 15.68/16 rounds up to a whole foot
    expect(formatTapeLength(0.01 * IN, 'ft')).toBe('0 in');
    expect(formatTapeLength(-0.01 * IN, 'ft')).toBe('0 in'); // no "-0 in"
  });

  it('negative lengths carry one sign for the whole, as the parser reads them', () => {
    expect(formatTapeLength(-(2 * 12 + 6.5) * IN, 'ft')).toBe('-2 ft 6 1/2 in');
    expect(parseLengthString('-2 ft 6 1/2 in')).toBeCloseTo(-(2 * 12 + 6.5) * IN, 14);
  });

  it('reads back within half a sixteenth, and exactly on the sixteenths themselves', () => {
    fc.assert(
      fc.property(fc.double({ min: -2000, max: 2000, noNaN: true }), fc.constantFrom<'ft' | 'in'>('ft', 'in'), (inches, unit) => {
        const back = parseLengthString(formatTapeLength(inches * IN, unit)) / IN;
        expect(Math.abs(back - inches)).toBeLessThanOrEqual(1 / 32 + 1e-9);
        const sixteenths = Math.round(inches * 16) / 16;
        expect(parseLengthString(formatTapeLength(sixteenths * IN, unit)) / IN).toBeCloseTo(sixteenths, 9);
      }),
    );
  });
});
