/**
 * The sRGB transfer functions of IEC 61966-2-1:1999 (sec. 5.2 decode, 5.3 encode), as scalar
 * functions on [0, 1] and as cached lookup tables for 8- and 16-bit code values. Brightness is
 * applied in linear light (DESIGN.md "Brightness"), so the remap kernels decode, scale and
 * re-encode through these tables.
 */

/** Decode breakpoint on the encoded side (IEC 61966-2-1). */
export const SRGB_DECODE_BREAK = 0.04045;
/** Encode breakpoint on the linear side (IEC 61966-2-1). */
export const SRGB_ENCODE_BREAK = 0.0031308;

/** sRGB encoded value c ∈ [0, 1] → linear light ∈ [0, 1]. Values outside [0, 1] are clamped. */
export function srgbToLinear(c: number): number {
  if (!(c > 0)) return 0; // also maps NaN to 0
  if (c >= 1) return 1;
  return c <= SRGB_DECODE_BREAK ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4);
}

/** Linear light l ∈ [0, 1] → sRGB encoded value ∈ [0, 1]. Values outside [0, 1] are clamped. */
export function linearToSrgb(l: number): number {
  if (!(l > 0)) return 0;
  if (l >= 1) return 1;
  return l <= SRGB_ENCODE_BREAK ? 12.92 * l : 1.055 * Math.pow(l, 1 / 2.4) - 0.055;
}

/**
 * Steps of the 8-bit encode table: entry i holds the code for linear i / SRGB_ENCODE8_STEPS,
 * looked up by rounding. The steepest slope (12.92 · 255 codes per unit, below the breakpoint)
 * moves at most 0.1 code over half a step, so the table is within 1 code of the exact formula.
 */
export const SRGB_ENCODE8_STEPS = 16383;
/**
 * Steps of the 16-bit encode table: entry i holds the exact (unrounded) code for linear
 * i / SRGB_ENCODE16_STEPS, linearly interpolated. The interpolation error h²/8·|f''|·65535 peaks
 * just above the breakpoint at about 0.03 code, so the rounded result is within 1 code.
 */
export const SRGB_ENCODE16_STEPS = 32768;

let decode8: Float32Array | undefined;
let decode16: Float32Array | undefined;
let encode8: Uint8Array | undefined;
let encode16: Float32Array | undefined;

/** Linear light of each 8-bit code value (256 entries, cached; do not modify). */
export function srgbDecodeLut8(): Float32Array {
  if (!decode8) decode8 = buildDecode(255);
  return decode8;
}

/** Linear light of each 16-bit code value (65536 entries, cached; do not modify). */
export function srgbDecodeLut16(): Float32Array {
  if (!decode16) decode16 = buildDecode(65535);
  return decode16;
}

/**
 * 8-bit encode table (SRGB_ENCODE8_STEPS + 1 entries, cached; do not modify):
 * code = table[round(l · SRGB_ENCODE8_STEPS)] for linear l ∈ [0, 1].
 */
export function srgbEncodeLut8(): Uint8Array {
  if (!encode8) {
    const n = SRGB_ENCODE8_STEPS;
    encode8 = new Uint8Array(n + 1);
    for (let i = 0; i <= n; i++) encode8[i] = Math.round(linearToSrgb(i / n) * 255);
  }
  return encode8;
}

/**
 * 16-bit encode table (SRGB_ENCODE16_STEPS + 2 entries, the last a guard equal to the one before;
 * cached; do not modify): unrounded codes at linear i / SRGB_ENCODE16_STEPS, to be linearly
 * interpolated and then rounded.
 */
export function srgbEncodeLut16(): Float32Array {
  if (!encode16) {
    const n = SRGB_ENCODE16_STEPS;
    encode16 = new Float32Array(n + 2);
    for (let i = 0; i <= n; i++) encode16[i] = linearToSrgb(i / n) * 65535;
    encode16[n + 1] = encode16[n];
  }
  return encode16;
}

/** Linear light → 8-bit code through the table (within 1 code of the exact formula). */
export function linearToCode8(l: number): number {
  if (!(l > 0)) return 0;
  if (l >= 1) return 255;
  return srgbEncodeLut8()[(l * SRGB_ENCODE8_STEPS + 0.5) | 0];
}

/** Linear light → 16-bit code through the table (within 1 code of the exact formula). */
export function linearToCode16(l: number): number {
  if (!(l > 0)) return 0;
  if (l >= 1) return 65535;
  const table = srgbEncodeLut16();
  const t = l * SRGB_ENCODE16_STEPS;
  const i = t | 0;
  const a = table[i];
  return (a + (t - i) * (table[i + 1] - a) + 0.5) | 0;
}

function buildDecode(max: number): Float32Array {
  const table = new Float32Array(max + 1);
  for (let i = 0; i <= max; i++) table[i] = srgbToLinear(i / max);
  return table;
}
