/**
 * Lengths as people write them on a tape-measure notebook: a bare number in the document's units,
 * or a string with its own unit ("8 ft", "19 in", "2.4 m", "7 ft 6 in", "35 cm"). Metres inside.
 */

export type LengthUnit = 'm' | 'cm' | 'mm' | 'ft' | 'in';

export const LENGTH_UNITS: readonly LengthUnit[] = ['m', 'cm', 'mm', 'ft', 'in'];

/** Metres per unit. The foot and inch are the international ones (exactly 0.3048 m, 0.0254 m). */
export const METRES_PER_UNIT: Readonly<Record<LengthUnit, number>> = { m: 1, cm: 0.01, mm: 0.001, ft: 0.3048, in: 0.0254 };

const UNIT_ALIASES: Readonly<Record<string, LengthUnit>> = {
  m: 'm', metre: 'm', metres: 'm', meter: 'm', meters: 'm',
  cm: 'cm', centimetre: 'cm', centimetres: 'cm', centimeter: 'cm', centimeters: 'cm',
  mm: 'mm', millimetre: 'mm', millimetres: 'mm', millimeter: 'mm', millimeters: 'mm',
  ft: 'ft', foot: 'ft', feet: 'ft', "'": 'ft', '′': 'ft',
  in: 'in', inch: 'in', inches: 'in', '"': 'in', '″': 'in',
};

/** The unit a spelled-out or symbol name stands for ("feet" → ft), if any. */
export function canonicalUnit(s: string): LengthUnit | undefined {
  return UNIT_ALIASES[s.toLowerCase()] ?? UNIT_ALIASES[s];
}

export function isLengthUnit(s: unknown): s is LengthUnit {
  return typeof s === 'string' && (LENGTH_UNITS as readonly string[]).includes(s);
}

/** Why a length string could not be read; `unit` is set when the trouble is an unknown unit. */
export class LengthSyntaxError extends Error {
  constructor(message: string, readonly unit?: string) {
    super(message);
  }
}

/**
 * One term: a whole number and a fraction ("1 1/2"), a fraction ("3/4"), or a decimal ("2.4", "1e3");
 * then its unit. Groups: 1–3 mixed, 4–5 fraction, 6–7 decimal and exponent, 8 the unit.
 */
const TERM = /^\s*(?:(\d+)\s+(\d+)\s*\/\s*(\d+)|(\d+)\s*\/\s*(\d+)|(\d+(?:\.\d*)?|\.\d+)(?:e([+-]?\d+))?)\s*([A-Za-z]+|['"′″])?/;

/**
 * Parses "7 ft 6 in", "-3 in", "2.4m", "35 cm", `7'6"` to metres, and lengths as a tape shows them:
 * "9 ft 1 1/2 in", "3/4 in", `5' 3 1/4"`. Each term needs a unit, except a plain zero ("0"); a
 * leading minus applies to the whole length. Throws LengthSyntaxError.
 */
export function parseLengthString(text: string): number {
  let rest = text.trim();
  let sign = 1;
  if (rest.startsWith('-') || rest.startsWith('−')) {
    sign = -1;
    rest = rest.slice(1);
  } else if (rest.startsWith('+')) {
    rest = rest.slice(1);
  }
  if (rest.trim() === '') throw new LengthSyntaxError('no number');
  // zero is zero in every unit
  if (/^\s*(0+(\.0*)?|\.0+)\s*$/.test(rest)) return 0;
  let total = 0;
  let terms = 0;
  while (rest.trim() !== '') {
    const m = TERM.exec(rest);
    if (!m) throw new LengthSyntaxError('not a length');
    let value: number;
    if (m[1] !== undefined || m[4] !== undefined) {
      const whole = m[1] !== undefined ? Number(m[1]) : 0;
      const num = Number(m[1] !== undefined ? m[2] : m[4]);
      const den = Number(m[1] !== undefined ? m[3] : m[5]);
      if (den === 0) throw new LengthSyntaxError('a fraction with 0 below the line');
      value = whole + num / den;
    } else value = Number(m[6]) * (m[7] ? 10 ** Number(m[7]) : 1);
    const unitText = m[8];
    if (unitText === undefined) throw new LengthSyntaxError('a number in a string needs a unit');
    const unit = UNIT_ALIASES[unitText.toLowerCase()] ?? UNIT_ALIASES[unitText];
    if (unit === undefined) throw new LengthSyntaxError(`unknown unit "${unitText}"`, unitText);
    total += value * METRES_PER_UNIT[unit];
    terms++;
    rest = rest.slice(m[0].length);
  }
  if (terms === 0) throw new LengthSyntaxError('not a length');
  return sign * total;
}

/** Metres → the given unit. */
export function fromMetres(metres: number, unit: LengthUnit): number {
  return metres / METRES_PER_UNIT[unit];
}

/** Metres → the given unit. */
export function toMetres(value: number, unit: LengthUnit): number {
  return value * METRES_PER_UNIT[unit];
}

/** A readable length in the given unit: "2.500 m", "8 ft 2.4 in", "31.5 in". */
export function formatLength(metres: number, unit: LengthUnit, digits = 3): string {
  if (unit === 'ft') {
    const inches = metres / METRES_PER_UNIT.in;
    const sign = inches < 0 ? '-' : '';
    const a = Math.abs(inches);
    let ft = Math.floor(a / 12);
    let rem = Number((a - ft * 12).toFixed(2));
    if (rem >= 12) {
      ft += 1;
      rem -= 12;
    }
    return ft === 0 ? `${sign}${rem} in` : `${sign}${ft} ft ${rem} in`;
  }
  return `${Number(fromMetres(metres, unit).toFixed(digits))} ${unit}`;
}

/**
 * A length in feet and inches (or inches) as a tape shows it, to the nearest 1/`denominator` inch
 * (sixteenths by default), the fraction in lowest terms: "9 ft 1 1/2 in", "3/4 in", "-2 ft 0 in".
 * parseLengthString reads it back exactly.
 */
export function formatTapeLength(metres: number, unit: 'ft' | 'in', denominator = 16): string {
  const parts = Math.round(Math.abs(metres / METRES_PER_UNIT.in) * denominator);
  const sign = parts > 0 && metres < 0 ? '-' : '';
  const perFoot = 12 * denominator;
  const ft = unit === 'ft' ? Math.floor(parts / perFoot) : 0;
  const rest = parts - ft * perFoot;
  const whole = Math.floor(rest / denominator);
  let num = rest - whole * denominator;
  let den = denominator;
  for (let g = gcd(num, den); g > 1; g = gcd(num, den)) {
    num /= g;
    den /= g;
  }
  const inches = num === 0 ? `${whole} in` : whole === 0 ? `${num}/${den} in` : `${whole} ${num}/${den} in`;
  return ft === 0 ? `${sign}${inches}` : `${sign}${ft} ft ${inches}`;
}

function gcd(a: number, b: number): number {
  while (b !== 0) [a, b] = [b, a % b];
  return a;
}
