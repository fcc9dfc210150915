/** Exact frame rates such as 30000/1001, as ffprobe writes them ("num/den"). */

export interface Rational {
  num: number;
  den: number;
}

function gcd(a: number, b: number): number {
  while (b) [a, b] = [b, a % b];
  return Math.abs(a);
}

/** Parses "num/den" or an integer; undefined for anything else, zero or negative (ffprobe's "0/0" = unknown). */
export function parseRational(text: string | undefined): Rational | undefined {
  const m = /^\s*(\d+)\s*(?:\/\s*(\d+)\s*)?$/.exec(text ?? '');
  if (!m) return undefined;
  const num = Number(m[1]);
  const den = m[2] === undefined ? 1 : Number(m[2]);
  if (num <= 0 || den <= 0 || !Number.isSafeInteger(num) || !Number.isSafeInteger(den)) return undefined;
  const g = gcd(num, den);
  return { num: num / g, den: den / g };
}

export function formatRational(r: Rational): string {
  return r.den === 1 ? String(r.num) : `${r.num}/${r.den}`;
}

export function rationalValue(r: Rational): number {
  return r.num / r.den;
}
