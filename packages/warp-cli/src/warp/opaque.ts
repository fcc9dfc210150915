/**
 * Masked pixels of a warped frame are opaque black unless the input uses its alpha: an RGBA (or
 * grey + alpha) frame whose alpha is everywhere full is an opaque picture that happens to carry an
 * alpha channel, and a viewer would show a transparent mask as white or checkered, not black.
 */
import type { ImageBuffer } from '@skyfold/warp-core';

/** True when the image has an alpha channel and every pixel's alpha is at full value. */
export function alphaUnused(img: ImageBuffer): boolean {
  if (img.channels !== 2 && img.channels !== 4) return false;
  const full = img.data instanceof Uint16Array ? 0xffff : 0xff;
  const c = img.channels;
  for (let k = c - 1; k < img.data.length; k += c) if (img.data[k] !== full) return false;
  return true;
}

/** Sets every pixel's alpha to full; masked pixels, black with alpha 0, become opaque black. */
export function fillAlpha(img: ImageBuffer): void {
  if (img.channels !== 2 && img.channels !== 4) return;
  const full = img.data instanceof Uint16Array ? 0xffff : 0xff;
  const c = img.channels;
  for (let k = c - 1; k < img.data.length; k += c) img.data[k] = full;
}
