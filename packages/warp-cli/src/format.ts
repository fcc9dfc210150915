/** Plain-text tables and numbers for people; JSON output goes straight through JSON.stringify. */
import { formatLength, formatTapeLength, type LengthUnit } from '@skyfold/warp-core';
import { runContext, writeOut } from './io/run-context.js';

export function table(header: string[], rows: string[][]): string {
  const widths = header.map((h, i) => rows.reduce((w, r) => Math.max(w, (r[i] ?? '').length), h.length));
  const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join('  ').trimEnd();
  return [line(header), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n');
}

export function fixed(x: number, digits: number): string {
  const s = x.toFixed(digits);
  return s === `-${(0).toFixed(digits)}` ? (0).toFixed(digits) : s;
}

export function printJson(value: unknown): void {
  writeOut(JSON.stringify(value) + '\n');
}

/**
 * A length for people in the rig's units: with `--fractions`, feet and inches as a tape reads them
 * ("9 ft 1 1/2 in", to the nearest 1/16 in); otherwise, and in metric units, formatLength's decimals.
 */
export function lengthText(metres: number, units: LengthUnit, digits?: number): string {
  if (runContext().fractions && (units === 'ft' || units === 'in')) return formatTapeLength(metres, units);
  return formatLength(metres, units, digits);
}
