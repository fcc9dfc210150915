import { describe, expect, it } from 'vitest';
import { SRGB_DECODE_BREAK, SRGB_ENCODE_BREAK, linearToCode16, linearToCode8, linearToSrgb, srgbDecodeLut16, srgbDecodeLut8, srgbToLinear } from '../src/srgb.js';

describe('sRGB transfer functions (IEC 61966-2-1:1999)', () => {
  it('decodes 0.5 to 0.2140 and encodes 0.5 to 0.7354', () => {
    // IEC 61966-2-1 sec. 5.2 (decode) and 5.3 (encode); the 4-digit values are the familiar
    // published ones for the midpoint.
    expect(srgbToLinear(0.5)).toBeCloseTo(0.214, 4);
    expect(linearToSrgb(0.5)).toBeCloseTo(0.7354, 4);
  });

  it('switches branch at 0.04045 / 0.0031308, where the two pieces meet', () => {
    // IEC 61966-2-1: linear segment c/12.92 up to 0.04045, power segment above.
    expect(SRGB_DECODE_BREAK).toBe(0.04045);
    expect(SRGB_ENCODE_BREAK).toBe(0.0031308);
    expect(srgbToLinear(0.04045)).toBeCloseTo(0.04045 / 12.92, 12);
    expect(srgbToLinear(0.04)).toBeCloseTo(0.04 / 12.92, 12);
    expect(srgbToLinear(0.0405)).toBeCloseTo(Math.pow((0.0405 + 0.055) / 1.055, 2.4), 12);
    expect(linearToSrgb(0.0031308)).toBeCloseTo(12.92 * 0.0031308, 12);
    expect(linearToSrgb(0.0031309)).toBeCloseTo(1.055 * Math.pow(0.0031309, 1 / 2.4) - 0.055, 12);
    // The pieces are continuous to within 1e-7 at the breakpoints.
    expect(Math.abs(srgbToLinear(0.04045 + 1e-12) - 0.04045 / 12.92)).toBeLessThan(1e-7);
    expect(Math.abs(linearToSrgb(0.0031308 + 1e-12) - 12.92 * 0.0031308)).toBeLessThan(1e-7);
  });

  it('fixes the ends, clamps outside [0, 1] and round-trips', () => {
    expect(srgbToLinear(0)).toBe(0);
    expect(srgbToLinear(1)).toBe(1);
    expect(linearToSrgb(0)).toBe(0);
    expect(linearToSrgb(1)).toBe(1);
    expect(srgbToLinear(-0.2)).toBe(0);
    expect(linearToSrgb(1.5)).toBe(1);
    expect(linearToSrgb(Number.NaN)).toBe(0);
    for (let c = 0; c <= 1; c += 1 / 64) expect(linearToSrgb(srgbToLinear(c))).toBeCloseTo(c, 12);
  });
});

describe('sRGB lookup tables', () => {
  it('decode tables hold the formula at every code value', () => {
    const d8 = srgbDecodeLut8();
    const d16 = srgbDecodeLut16();
    expect(d8.length).toBe(256);
    expect(d16.length).toBe(65536);
    for (let c = 0; c < 256; c++) expect(d8[c]).toBe(Math.fround(srgbToLinear(c / 255)));
    for (let c = 0; c < 65536; c++) {
      if (d16[c] !== Math.fround(srgbToLinear(c / 65535))) throw new Error(`16-bit decode differs at ${c}`);
    }
    expect(srgbDecodeLut8()).toBe(d8); // cached
  });

  it('encode through the tables is within 1 code of the exact formula everywhere (exhaustive)', () => {
    // Every 8- and 16-bit code's linear value, and a dense sweep of 2^20 + 1 linear values.
    let worst8 = 0;
    let worst16 = 0;
    const check = (l: number) => {
      const e8 = Math.abs(linearToCode8(l) - Math.round(linearToSrgb(l) * 255));
      const e16 = Math.abs(linearToCode16(l) - Math.round(linearToSrgb(l) * 65535));
      if (e8 > worst8) worst8 = e8;
      if (e16 > worst16) worst16 = e16;
    };
    const n = 1 << 20;
    for (let k = 0; k <= n; k++) check(k / n);
    const d8 = srgbDecodeLut8();
    const d16 = srgbDecodeLut16();
    for (let c = 0; c < 256; c++) check(d8[c]);
    for (let c = 0; c < 65536; c++) check(d16[c]);
    check(SRGB_ENCODE_BREAK);
    expect(worst8).toBeLessThanOrEqual(1);
    expect(worst16).toBeLessThanOrEqual(1);
  });

  it('decode then table-encode returns every code value', () => {
    const d8 = srgbDecodeLut8();
    for (let c = 0; c < 256; c++) expect(linearToCode8(d8[c])).toBe(c);
    const d16 = srgbDecodeLut16();
    let worst = 0;
    for (let c = 0; c < 65536; c++) worst = Math.max(worst, Math.abs(linearToCode16(d16[c]) - c));
    expect(worst).toBeLessThanOrEqual(1);
  });
});
