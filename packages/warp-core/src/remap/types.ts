/** An interleaved image held in a typed array: 8-bit (Uint8Array) or 16-bit (Uint16Array) samples. */
export interface ImageBuffer {
  width: number;
  height: number;
  /** 1 = grey, 2 = grey + alpha, 3 = RGB, 4 = RGBA. The last channel of 2 and 4 is alpha. */
  channels: 1 | 2 | 3 | 4;
  data: Uint8Array | Uint16Array;
}

/**
 * A per-output-pixel lookup: for output pixel (i, j) at index k = j·width + i, the continuous source
 * pixel coordinate (x[k], y[k]) to sample, in the source image's pixel units with pixel centres at
 * +0.5 (source pixel (p, q) covers [p, p+1) × [q, q+1)), and a linear-light gain (brightness × mask;
 * 0 = black).
 */
export interface RemapMap {
  width: number;
  height: number;
  x: Float32Array;
  y: Float32Array;
  gain: Float32Array;
}

export type RemapFilter = 'nearest' | 'bilinear' | 'area';
