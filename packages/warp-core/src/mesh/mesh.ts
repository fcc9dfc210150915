/**
 * The warp mesh: a regular grid of vertices over the projector frame, corner to corner.
 *
 * Vertex (c, r), 0 ≤ c < cols, 0 ≤ r < rows, is stored at index r·cols + c (row-major, first row
 * at the top of the projector frame) and sits at projector pixel coordinate
 * x = c·width/(cols−1), y = r·height/(rows−1) (DESIGN.md: pixel coordinates are continuous,
 * x right, y down, the frame spans [0, width] × [0, height]).
 */
export interface WarpMesh {
  /** Vertices across (≥ 2). */
  cols: number;
  /** Vertices down (≥ 2). */
  rows: number;
  /** Projector resolution the grid spans, in pixels. */
  width: number;
  height: number;
  /** Fisheye (dome master) coordinates per vertex, DESIGN.md convention (u right, v down, [0,1]). Always finite. */
  u: Float32Array;
  v: Float32Array;
  /** Brightness compensation factor per vertex in [0, 1], a linear-light multiplier. */
  brightness: Float32Array;
  /** 1 = light this point, 0 = black (mirror miss, beyond the content's edge); soft edges in between. */
  mask: Float32Array;
  /** The rig document and bake settings, carried in file metadata (glTF `extras`). JSON-serialisable. */
  meta: Record<string, unknown>;
}

/** Projector pixel coordinate of vertex (c, r). */
export function meshVertexPosition(mesh: Pick<WarpMesh, 'cols' | 'rows' | 'width' | 'height'>, c: number, r: number): [number, number] {
  return [(c * mesh.width) / (mesh.cols - 1), (r * mesh.height) / (mesh.rows - 1)];
}

/** Allocates an empty mesh (u = v = 0, brightness = 1, mask = 0). */
export function createMesh(cols: number, rows: number, width: number, height: number, meta: Record<string, unknown> = {}): WarpMesh {
  const n = cols * rows;
  const brightness = new Float32Array(n).fill(1);
  return { cols, rows, width, height, u: new Float32Array(n), v: new Float32Array(n), brightness, mask: new Float32Array(n), meta };
}
