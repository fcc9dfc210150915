/** Parsers for command-line values; each throws commander's InvalidArgumentError with what was expected. */
import { InvalidArgumentError } from 'commander';

export function parseNumberPair(text: string, what: string): [number, number] {
  const parts = text.split(',').map((s) => s.trim());
  const nums = parts.map(Number);
  if (parts.length !== 2 || parts.some((p) => p === '') || !nums.every(Number.isFinite)) {
    throw new InvalidArgumentError(`expected ${what}, got "${text}"`);
  }
  return [nums[0], nums[1]];
}

/** Accumulates a repeatable option's values. */
export function collect<T>(parse: (s: string) => T): (value: string, previous: T[] | undefined) => T[] {
  return (value, previous) => [...(previous ?? []), parse(value)];
}

export function parsePositiveInt(text: string, what = 'a positive whole number'): number {
  const n = Number(text);
  if (!Number.isInteger(n) || n <= 0) throw new InvalidArgumentError(`expected ${what}, got "${text}"`);
  return n;
}

export function parseNumberIn(lo: number, hi: number): (text: string) => number {
  return (text: string) => {
    const n = Number(text);
    if (text.trim() === '' || !Number.isFinite(n) || n < lo || n > hi) throw new InvalidArgumentError(`expected a number from ${lo} to ${hi}, got "${text}"`);
    return n;
  };
}
