/**
 * Wavefront OBJ: the warp mesh as a flat grid in projector normalized device coordinates.
 *
 * - `v x y 0 k k k`: x = 2·px/width − 1 (right), y = 1 − 2·py/height (up), z = 0, followed by the widely
 *   read vertex-colour extension (r g b after x y z) holding k = brightness·mask, the factor the
 *   projector's light is multiplied by (0 for unlit points).
 * - `vt u t`: t = 1 − v, because OBJ's texture origin is the bottom-left corner and ours is the top-left.
 * - `f a/a b/b c/c`: 1-based, two triangles per grid cell, counter-clockwise as seen from +z.
 * - Comment lines carry what OBJ has no place for, so the file reads back losslessly:
 *   `# skyfold-grid cols rows width height`, `# skyfold-meta {json}` and one `#bm brightness mask`
 *   line per vertex in vertex order.
 * Vertices are in grid order: the top row first, left to right. Unlit points keep their (finite) u, v.
 */
import type { TriangleWarpMesh, WarpMesh } from '@skyfold/warp-core';
import { formatFloat32 } from './csv.js';

export function writeObj(mesh: WarpMesh): string {
  const { cols, rows, width, height } = mesh;
  const n = cols * rows;
  const out: string[] = [
    '# skyfold warp mesh (Wavefront OBJ)',
    '# v x y 0 k k k : projector position in normalized device coordinates, x in [-1,1] right, y in [-1,1] up;',
    '#                 k k k = vertex colour = brightness*mask (linear-light light factor, 0 = unlit)',
    '# vt u t        : fisheye (dome master) coordinates, u right, t = 1 - v (OBJ texture origin bottom-left)',
    '# f             : two triangles per grid cell, counter-clockwise seen from +z',
    '# vertex order  : grid row by row from the top row of the projector frame, left to right',
    '# #bm b m       : per vertex, in vertex order: brightness factor and mask (1 lit, 0 unlit)',
    `# skyfold-grid ${cols} ${rows} ${width} ${height}`,
    `# skyfold-meta ${JSON.stringify(mesh.meta)}`,
  ];
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const k = formatFloat32(mesh.brightness[r * cols + c] * mesh.mask[r * cols + c]);
      out.push(`v ${formatFloat32((2 * c) / (cols - 1) - 1)} ${formatFloat32(1 - (2 * r) / (rows - 1))} 0 ${k} ${k} ${k}`);
    }
  }
  for (let i = 0; i < n; i++) out.push(`vt ${formatFloat32(mesh.u[i])} ${formatFloat32(1 - mesh.v[i])}`);
  for (let r = 0; r + 1 < rows; r++) {
    for (let c = 0; c + 1 < cols; c++) {
      const a = r * cols + c + 1; // top-left, 1-based
      const b = a + 1; // top-right
      const d = a + cols; // bottom-left
      const e = d + 1; // bottom-right
      out.push(`f ${a}/${a} ${d}/${d} ${e}/${e}`, `f ${a}/${a} ${e}/${e} ${b}/${b}`);
    }
  }
  for (let i = 0; i < n; i++) out.push(`#bm ${formatFloat32(mesh.brightness[i])} ${formatFloat32(mesh.mask[i])}`);
  return out.join('\n') + '\n';
}

/**
 * The adaptive mesh as OBJ: the same lines as the grid's, its vertices where the quadtree put them and
 * its own triangles; `# skyfold-triangles width height` in place of the grid line.
 */
export function writeTriangleObj(mesh: TriangleWarpMesh): string {
  const n = mesh.x.length;
  const out: string[] = [
    '# skyfold warp mesh (Wavefront OBJ), adaptive: a restricted quadtree of triangles',
    '# v x y 0 k k k : projector position in normalized device coordinates, x in [-1,1] right, y in [-1,1] up;',
    '#                 k k k = vertex colour = brightness*mask (linear-light light factor, 0 = unlit)',
    '# vt u t        : fisheye (dome master) coordinates, u right, t = 1 - v (OBJ texture origin bottom-left)',
    '# f             : triangles, counter-clockwise seen from +z',
    '# #bm b m       : per vertex, in vertex order: brightness factor and mask (1 lit, 0 unlit)',
    `# skyfold-triangles ${mesh.width} ${mesh.height}`,
    `# skyfold-meta ${JSON.stringify(mesh.meta)}`,
  ];
  for (let i = 0; i < n; i++) {
    const k = formatFloat32(mesh.brightness[i] * mesh.mask[i]);
    out.push(`v ${formatFloat32((2 * mesh.x[i]) / mesh.width - 1)} ${formatFloat32(1 - (2 * mesh.y[i]) / mesh.height)} 0 ${k} ${k} ${k}`);
  }
  for (let i = 0; i < n; i++) out.push(`vt ${formatFloat32(mesh.u[i])} ${formatFloat32(1 - mesh.v[i])}`);
  for (let t = 0; t < mesh.indices.length; t += 3) {
    const [a, b, c] = [mesh.indices[t] + 1, mesh.indices[t + 1] + 1, mesh.indices[t + 2] + 1];
    out.push(`f ${a}/${a} ${b}/${b} ${c}/${c}`);
  }
  for (let i = 0; i < n; i++) out.push(`#bm ${formatFloat32(mesh.brightness[i])} ${formatFloat32(mesh.mask[i])}`);
  return out.join('\n') + '\n';
}

/** Reads an adaptive OBJ written by {@link writeTriangleObj}, or undefined when the text is not one. */
export function readTriangleObj(text: string): TriangleWarpMesh | undefined {
  const head = /^# skyfold-triangles (\S+) (\S+)\s*$/m.exec(text);
  if (!head) return undefined;
  const width = Number(head[1]);
  const height = Number(head[2]);
  if (!(width > 0 && height > 0 && Number.isFinite(width) && Number.isFinite(height))) throw new Error('Expected a positive width and height on the "# skyfold-triangles" line');
  let meta: Record<string, unknown> = {};
  const pos: number[] = [];
  const vt: number[] = [];
  const bm: number[] = [];
  const idx: number[] = [];
  for (const raw of text.split(/\r?\n/)) {
    const line = raw.trim();
    if (line.startsWith('# skyfold-meta ')) meta = JSON.parse(line.slice(15)) as Record<string, unknown>;
    else if (line.startsWith('vt ')) for (const x of line.slice(3).trim().split(/\s+/).slice(0, 2)) vt.push(Number(x));
    else if (line.startsWith('v ')) for (const x of line.slice(2).trim().split(/\s+/).slice(0, 2)) pos.push(Number(x));
    else if (line.startsWith('#bm ')) for (const x of line.slice(4).trim().split(/\s+/)) bm.push(Number(x));
    else if (line.startsWith('f ')) {
      const f = line.slice(2).trim().split(/\s+/).map((p) => Number(p.split('/')[0]) - 1);
      if (f.length !== 3) throw new Error(`Expected triangles in the adaptive OBJ but received a face of ${f.length} vertices`);
      idx.push(...f);
    }
  }
  const n = pos.length / 2;
  if (n < 3 || vt.length !== 2 * n || bm.length !== 2 * n) throw new Error(`Expected as many v, vt and #bm lines in the OBJ but received ${n}, ${vt.length / 2}, ${bm.length / 2}`);
  for (const i of idx) if (!(Number.isInteger(i) && i >= 0 && i < n)) throw new Error(`Expected face indices from 1 to ${n} in the OBJ but received ${i + 1}`);
  return {
    width,
    height,
    x: Float32Array.from({ length: n }, (_, i) => ((pos[2 * i] + 1) * width) / 2),
    y: Float32Array.from({ length: n }, (_, i) => ((1 - pos[2 * i + 1]) * height) / 2),
    u: Float32Array.from({ length: n }, (_, i) => vt[2 * i]),
    v: Float32Array.from({ length: n }, (_, i) => 1 - vt[2 * i + 1]),
    brightness: Float32Array.from({ length: n }, (_, i) => bm[2 * i]),
    mask: Float32Array.from({ length: n }, (_, i) => bm[2 * i + 1]),
    indices: Uint32Array.from(idx),
    meta,
  };
}

/** Reads an OBJ written by {@link writeObj} (it needs the skyfold comment lines). */
export function readObj(text: string): WarpMesh {
  let grid: number[] | undefined;
  let meta: Record<string, unknown> = {};
  const vt: number[] = [];
  const bm: number[] = [];
  let vCount = 0;
  for (const raw of text.split(/\r?\n/)) {
    const line = raw.trim();
    if (line.startsWith('# skyfold-grid ')) grid = line.slice(15).trim().split(/\s+/).map(Number);
    else if (line.startsWith('# skyfold-meta ')) meta = JSON.parse(line.slice(15)) as Record<string, unknown>;
    else if (line.startsWith('vt ')) for (const x of line.slice(3).trim().split(/\s+/).slice(0, 2)) vt.push(Number(x));
    else if (line.startsWith('v ')) vCount++;
    else if (line.startsWith('#bm ')) for (const x of line.slice(4).trim().split(/\s+/)) bm.push(Number(x));
  }
  if (!grid || grid.length !== 4 || grid.some((x) => !Number.isFinite(x))) {
    throw new Error('Expected a "# skyfold-grid cols rows width height" line in the OBJ (not a skyfold warp mesh?)');
  }
  const [cols, rows, width, height] = grid;
  const n = cols * rows;
  if (vCount !== n || vt.length !== 2 * n || bm.length !== 2 * n) {
    throw new Error(`Expected ${n} v, vt and #bm lines in the OBJ for a ${cols}×${rows} grid but received ${vCount}, ${vt.length / 2}, ${bm.length / 2}`);
  }
  const mesh: WarpMesh = { cols, rows, width, height, u: new Float32Array(n), v: new Float32Array(n), brightness: new Float32Array(n), mask: new Float32Array(n), meta };
  for (let i = 0; i < n; i++) {
    mesh.u[i] = vt[2 * i];
    mesh.v[i] = 1 - vt[2 * i + 1];
    mesh.brightness[i] = bm[2 * i];
    mesh.mask[i] = bm[2 * i + 1];
  }
  return mesh;
}
