// A show-like dome master for the bench: detail everywhere, like a rendered nebula fly-through with
// film grain, not a mostly black star field. Deterministic (integer hashing, no Math.random), so
// every run decodes, warps and encodes the same bytes.
//
// Fractal value noise (five octaves, cells 512 px down to 32 px, smoothstep blend) per colour
// channel, a colour ramp over it, sparse bright stars, and ±4 code values of per-pixel grain. The
// grain keeps PNG from compressing the frame far below what rendered or filmed content gives.

/** 32-bit integer hash (the "lowbias32" mixer, from memory). */
function hash(x) {
  x ^= x >>> 16;
  x = Math.imul(x, 0x7feb352d);
  x ^= x >>> 15;
  x = Math.imul(x, 0x846ca68b);
  x ^= x >>> 16;
  return x >>> 0;
}

/** Lattice values in [0, 1) for one octave: (g+2)² cells, so a lookup never leaves the table. */
function lattice(g, seed) {
  const t = new Float32Array((g + 2) * (g + 2));
  for (let k = 0; k < t.length; k++) t[k] = hash(k * 0x9e3779b1 + seed) / 4294967296;
  return t;
}

/** Adds amplitude × value noise with `cell`-pixel cells to row y of acc (gx, tx: the columns' cells and blends). */
function addOctaveRow(acc, n, y, cell, table, g, amplitude, gxs, txs) {
  const fy = y / cell;
  const gy = fy | 0;
  let ty = fy - gy;
  ty = ty * ty * (3 - 2 * ty);
  const r0 = gy * (g + 2);
  const r1 = r0 + g + 2;
  for (let x = 0; x < n; x++) {
    const gx = gxs[x];
    const tx = txs[x];
    const a = table[r0 + gx] + (table[r0 + gx + 1] - table[r0 + gx]) * tx;
    const b = table[r1 + gx] + (table[r1 + gx + 1] - table[r1 + gx]) * tx;
    acc[x] += amplitude * (a + (b - a) * ty);
  }
}

/** An n × n RGB8 show-like frame; `seed` picks the content. */
export function showFrame(n, seed = 1) {
  const data = new Uint8Array(n * n * 3);
  const cells = [512, 256, 128, 64, 32];
  const channels = [0, 1, 2].map((c) =>
    cells.map((cell, o) => {
      const g = Math.ceil(n / cell);
      const gxs = new Int32Array(n);
      const txs = new Float32Array(n);
      for (let x = 0; x < n; x++) {
        gxs[x] = Math.floor(x / cell);
        const t = x / cell - gxs[x];
        txs[x] = t * t * (3 - 2 * t);
      }
      return { cell, g, table: lattice(g, hash(seed * 7919 + c * 131 + o)), amplitude: 0.5 ** o, gxs, txs };
    }),
  );
  const norm = cells.reduce((s, _, o) => s + 0.5 ** o, 0);
  const acc = [new Float32Array(n), new Float32Array(n), new Float32Array(n)];
  for (let y = 0; y < n; y++) {
    for (let c = 0; c < 3; c++) {
      acc[c].fill(0);
      for (const oct of channels[c]) addOctaveRow(acc[c], n, y, oct.cell, oct.table, oct.g, oct.amplitude, oct.gxs, oct.txs);
    }
    for (let x = 0, o = y * n * 3; x < n; x++, o += 3) {
      const h = hash(y * n + x + seed * 0x85ebca6b);
      // a nebula-like ramp: dense regions glow warm, thin ones cool and dark
      const d = acc[0][x] / norm;
      const m = acc[1][x] / norm;
      const e = acc[2][x] / norm;
      const grain = ((h & 0xff) / 255 - 0.5) * 8;
      let r = 255 * d * d * 1.6 + 40 * e + grain;
      let gch = 200 * d * m + 60 * e * e + grain;
      let b = 90 + 150 * e - 80 * d + grain;
      if ((h >>> 8) % 1500 === 0) r = gch = b = 255; // a star
      data[o] = r < 0 ? 0 : r > 255 ? 255 : r;
      data[o + 1] = gch < 0 ? 0 : gch > 255 ? 255 : gch;
      data[o + 2] = b < 0 ? 0 : b > 255 ? 255 : b;
    }
  }
  return { width: n, height: n, channels: 3, data };
}
