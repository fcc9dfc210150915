import type { ImageBuffer } from '../types.js';
import { PYRAMID_WASM } from './pyramid-wasm.js';

/**
 * The 2 × 2 reduction of 8-bit pyramid levels in WebAssembly (SIMD, pyramid.wat), about 10× the
 * speed of the JavaScript reduction it reproduces bit for bit. The source is copied into the
 * module's memory, the levels are built there, and callers read them through views that stay
 * valid until the next WasmLevels is made. Where WebAssembly or its SIMD is missing, `create`
 * returns null and the JavaScript reduction does the work.
 */

// The few WebAssembly JS API names used here (the project's libs carry no WebAssembly typings).
interface WasmMemory {
  readonly buffer: ArrayBuffer;
  grow(pages: number): number;
}
declare const WebAssembly: {
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: object };
};

interface Exports {
  memory: WasmMemory;
  reduce8(src: number, W: number, H: number, C: number, out: number, mask: number, step: number, take: number): void;
  box8(src: number, W: number, H: number, C: number, out: number): void;
}

let exportsOrNull: Exports | null | undefined;

/** Instantiates the module on first use (synchronously: it is 500 bytes). */
function kernel(): Exports | null {
  if (exportsOrNull === undefined) {
    try {
      const bytes = Uint8Array.from(atob(PYRAMID_WASM), (c) => c.charCodeAt(0));
      exportsOrNull = new WebAssembly.Instance(new WebAssembly.Module(bytes), {}).exports as unknown as Exports;
    } catch {
      exportsOrNull = null;
    }
  }
  return exportsOrNull;
}

// For C channels: the swizzle mask that keeps, of 16 pair sums, the first sample of each pixel
// pair; how many source bytes one vector consumes and how many output bytes it yields.
const MASKS: Record<number, number[]> = {
  1: [0, 2, 4, 6, 8, 10, 12, 14],
  2: [0, 1, 4, 5, 8, 9, 12, 13],
  3: [0, 1, 2, 6, 7, 8, 12, 13, 14],
  4: [0, 1, 2, 3, 8, 9, 10, 11],
};
/** Bytes after each image in memory that the whole-vector reads and writes may touch. */
const SLACK = 64;
const PAGE = 65536;

/** The pyramid levels of one 8-bit source, in WebAssembly memory. */
export class WasmLevels {
  private readonly k: Exports;
  private readonly src: ImageBuffer;
  /** Byte offset of level l (0: the copy of the source) and its size. */
  private readonly offset: number[] = [];
  private readonly dims: [number, number][] = [];
  private readonly halfAt: number;
  private copied = false;

  private constructor(k: Exports, src: ImageBuffer, levels: number) {
    this.k = k;
    this.src = src;
    let at = 16; // the swizzle mask sits at 0
    let w = src.width;
    let h = src.height;
    for (let l = 0; l < levels; l++) {
      this.offset.push(at);
      this.dims.push([w, h]);
      at += w * h * src.channels + SLACK;
      w = (w + 1) >> 1;
      h = (h + 1) >> 1;
    }
    this.halfAt = at;
    at += src.data.length + SLACK;
    const have = k.memory.buffer.byteLength;
    if (at > have) k.memory.grow(Math.ceil((at - have) / PAGE));
  }

  /**
   * Room for `levels` levels (the source included) and the half level of src, or null when src is not 8-bit or
   * WebAssembly is unavailable. Invalidates the views of any earlier WasmLevels.
   */
  static create(src: ImageBuffer, levels: number): WasmLevels | null {
    if (!(src.data instanceof Uint8Array) || !MASKS[src.channels]) return null;
    const k = kernel();
    if (!k) return null;
    try {
      return new WasmLevels(k, src, levels);
    } catch {
      return null; // memory would not grow
    }
  }

  private copySource(): ArrayBuffer {
    const mem = this.k.memory.buffer;
    if (!this.copied) {
      new Uint8Array(mem, this.offset[0], this.src.data.length).set(this.src.data);
      this.copied = true;
    }
    return mem;
  }

  /** Builds the half level (see SourcePyramid) and returns a view of it. */
  half(): ImageBuffer {
    const { k, src } = this;
    const mem = this.copySource();
    k.box8(this.offset[0], src.width, src.height, src.channels, this.halfAt);
    return { width: src.width, height: src.height, channels: src.channels, data: new Uint8Array(mem, this.halfAt, src.data.length) };
  }

  /** Builds level l (≥ 1) from level l − 1, which must have been built, and returns a view of it. */
  level(l: number): ImageBuffer {
    const { k, src } = this;
    const C = src.channels;
    const mem = this.copySource();
    const mask = new Uint8Array(mem, 0, 16);
    mask.fill(0x80); // out-of-range lanes read as zero
    mask.set(MASKS[C]);
    const [W, H] = this.dims[l - 1];
    k.reduce8(this.offset[l - 1], W, H, C, this.offset[l], 0, C === 3 ? 18 : 16, MASKS[C].length);
    const [w, h] = this.dims[l];
    return { width: w, height: h, channels: src.channels, data: new Uint8Array(mem, this.offset[l], w * h * C) };
  }
}
