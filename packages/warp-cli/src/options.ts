/**
 * Parsers for command-line values, one per kind of value; each throws commander's InvalidArgumentError
 * saying what was expected and what came, which the program prints as `skyfold: --option: ...`.
 */
import { InvalidArgumentError } from 'commander';

/** Accumulates a repeatable option's values. */
export function collect<T>(parse: (s: string) => T): (value: string, previous: T[] | undefined) => T[] {
  return (value, previous) => [...(previous ?? []), parse(value)];
}

/** A whole number ≥ 1. */
export function parsePositiveInt(text: string, what = 'a positive whole number'): number {
  const n = Number(text);
  if (text.trim() === '' || !Number.isInteger(n) || n <= 0) throw new InvalidArgumentError(`expected ${what}, got "${text}"`);
  return n;
}

/** An angle in degrees, any finite number (a turn of more than a million degrees is a typing mistake). */
export function parseAngle(text: string): number {
  const n = Number(text);
  if (text.trim() === '' || !Number.isFinite(n) || Math.abs(n) > 1e6) throw new InvalidArgumentError(`expected an angle in degrees, got "${text}"`);
  return n;
}

/** A finite number from `lo` to `hi`. */
export function parseNumberIn(lo: number, hi: number): (text: string) => number {
  return (text: string) => {
    const n = Number(text);
    if (text.trim() === '' || !Number.isFinite(n) || n < lo || n > hi) throw new InvalidArgumentError(`expected a number from ${lo} to ${hi}, got "${text}"`);
    return n;
  };
}

/** Two finite numbers "A,B"; `what` names them for the message. */
export function parseNumberPair(text: string, what: string): [number, number] {
  const parts = text.split(',').map((s) => s.trim());
  const nums = parts.map(Number);
  if (parts.length !== 2 || parts.some((p) => p === '') || !nums.every(Number.isFinite)) {
    throw new InvalidArgumentError(`expected ${what}, got "${text}"`);
  }
  return [nums[0], nums[1]];
}

/** A dome direction "AZ,ALT" in degrees, the altitude from -90 to 90; `what` names the other forms accepted. */
export function parseDirection(text: string, what = 'AZ,ALT (azimuth and altitude in degrees)'): [number, number] {
  const [az, alt] = parseNumberPair(text, what);
  if (alt < -90 || alt > 90) throw new InvalidArgumentError(`expected an altitude from -90 to 90 degrees, got "${text}"`);
  return [az, alt];
}

export interface SizeRule {
  /** The smallest width and height. */
  min: number;
  /** The largest width and height, and why (for the message), if there is a bound. */
  max?: { value: number; why: string };
  /** The separators accepted between the two numbers besides "x". */
  separators?: string;
  /** The message's description, e.g. 'COLSxROWS with at least 2 each (e.g. 321x201)'. */
  what: string;
}

/** A size "WxH" of two whole numbers, each at least `rule.min`. */
export function parseSize(rule: SizeRule): (text: string) => [number, number] {
  const seps = `xX×${rule.separators ?? ''}`.replace(/[\]\\^-]/g, '\\$&');
  const re = new RegExp(`^\\s*(\\d+)\\s*[${seps}]\\s*(\\d+)\\s*$`);
  return (text: string) => {
    const m = re.exec(text);
    const w = m ? Number(m[1]) : NaN;
    const h = m ? Number(m[2]) : NaN;
    const shown = text.length > 40 ? text.slice(0, 39) + '…' : text;
    if (!(w >= rule.min && h >= rule.min)) throw new InvalidArgumentError(`expected ${rule.what}, got "${shown}"`);
    if (rule.max && (w > rule.max.value || h > rule.max.value)) throw new InvalidArgumentError(`expected at most ${rule.max.value} a side (${rule.max.why}), got "${shown}"`);
    return [w, h];
  };
}

/** Turns a parser that throws a UserError naming its option ("--frames: ...") into an option parser. */
export function asOptionParser<T>(flag: string, parse: (text: string) => T): (text: string) => T {
  return (text: string) => {
    try {
      return parse(text);
    } catch (e) {
      const message = (e as Error).message;
      if (message.startsWith(`${flag}: `)) throw new InvalidArgumentError(message.slice(flag.length + 2));
      throw e;
    }
  };
}
