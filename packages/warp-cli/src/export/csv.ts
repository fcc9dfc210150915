/**
 * CSV: one line per vertex, the top row first, left to right.
 *
 *   column,row,x,y,u,v,brightness,mask
 *
 * x, y = projector pixel coordinates (x right, y down, the frame spans [0, width] × [0, height]);
 * u, v = fisheye coordinates (u right, v down, [0, 1]); unlit points keep their u, v and have mask 0.
 * Comma separated, "." decimal point, LF line ends, no quoting (RFC 4180 compatible).
 */
import { meshVertexPosition, type WarpMesh } from '@skyfold/warp-core';

export const CSV_HEADER = 'column,row,x,y,u,v,brightness,mask';

/** The shortest decimal text that reads back as the same float32. */
export function formatFloat32(value: number): string {
  const f = Math.fround(value);
  for (let p = 1; p < 9; p++) {
    const s = Number(f.toPrecision(p));
    if (Math.fround(s) === f) return String(s);
  }
  return String(Number(f.toPrecision(9)));
}

export function writeCsv(mesh: WarpMesh): string {
  const lines = [CSV_HEADER];
  for (let r = 0; r < mesh.rows; r++) {
    for (let c = 0; c < mesh.cols; c++) {
      const i = r * mesh.cols + c;
      const [x, y] = meshVertexPosition(mesh, c, r);
      lines.push(
        `${c},${r},${x},${y},${formatFloat32(mesh.u[i])},${formatFloat32(mesh.v[i])},` +
          `${formatFloat32(mesh.brightness[i])},${formatFloat32(mesh.mask[i])}`,
      );
    }
  }
  return lines.join('\n') + '\n';
}

/** Reads a file written by {@link writeCsv}; the grid size comes from the largest column/row and x/y. */
export function readCsv(text: string): WarpMesh {
  const lines = text.split(/\r?\n/).filter((l) => l.trim() !== '');
  if (lines.length === 0 || lines[0].trim() !== CSV_HEADER) {
    throw new Error(`Expected CSV header "${CSV_HEADER}" but received "${(lines[0] ?? '').slice(0, 80)}"`);
  }
  const records: number[][] = [];
  for (let k = 1; k < lines.length; k++) {
    const f = lines[k].split(',').map(Number);
    if (f.length !== 8 || f.some((x) => !Number.isFinite(x))) throw new Error(`Expected 8 numbers on CSV line ${k + 1} but received "${lines[k].slice(0, 80)}"`);
    records.push(f);
  }
  let cols = 0;
  let rows = 0;
  for (const f of records) {
    cols = Math.max(cols, f[0] + 1);
    rows = Math.max(rows, f[1] + 1);
  }
  if (cols < 2 || rows < 2 || records.length !== cols * rows) {
    throw new Error(`Expected a full grid of at least 2×2 vertices in the CSV but received ${records.length} lines for ${cols}×${rows}`);
  }
  const n = cols * rows;
  const mesh: WarpMesh = { cols, rows, width: 0, height: 0, u: new Float32Array(n), v: new Float32Array(n), brightness: new Float32Array(n), mask: new Float32Array(n), meta: {} };
  const seen = new Uint8Array(n);
  for (const [c, r, x, y, u, v, b, m] of records) {
    if (!Number.isInteger(c) || !Number.isInteger(r) || c < 0 || r < 0) throw new Error(`Expected integer column and row in the CSV but received ${c},${r}`);
    const i = r * cols + c;
    if (seen[i]) throw new Error(`Expected each CSV vertex once but column ${c}, row ${r} repeats`);
    seen[i] = 1;
    mesh.u[i] = u;
    mesh.v[i] = v;
    mesh.brightness[i] = b;
    mesh.mask[i] = m;
    if (c === cols - 1) mesh.width = x;
    if (r === rows - 1) mesh.height = y;
  }
  return mesh;
}
