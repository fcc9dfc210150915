/**
 * What every mesh reader checks before a mesh leaves it: sizes a projector can have, and values a
 * player can use. A crafted or damaged file must be refused here, not warp to black or allocate gigabytes.
 */
import { createMesh, MAX_PROJECTOR_SIDE, type TriangleWarpMesh, type WarpMesh } from '@skyfold/warp-core';

/** Vertices a side: one per projector pixel at most, plus the closing corner. */
export const MAX_GRID_SIDE = MAX_PROJECTOR_SIDE + 1;

/**
 * Fisheye coordinates beyond this are no content position: the content circle is [0, 1]; directions
 * below it reach ρ = 180° / (fov / 2), at most 36 000 for the narrowest fov a rig may give (0.01°).
 */
const MAX_UV = 1e5;

/** Throws when a grid of cols × rows spanning width × height pixels is not one a projector can have. */
export function checkMeshSize(cols: number, rows: number, width: number, height: number): void {
  const whole = (x: number, lo: number, hi: number) => Number.isInteger(x) && x >= lo && x <= hi;
  if (!whole(cols, 2, MAX_GRID_SIDE) || !whole(rows, 2, MAX_GRID_SIDE)) {
    throw new Error(`Expected a grid of 2 to ${MAX_GRID_SIDE} vertices a side but received ${show(cols)}×${show(rows)}`);
  }
  if (!(Number.isFinite(width) && width > 0 && width <= MAX_PROJECTOR_SIDE && Number.isFinite(height) && height > 0 && height <= MAX_PROJECTOR_SIDE)) {
    throw new Error(`Expected a projector frame of at most ${MAX_PROJECTOR_SIDE} pixels a side but received ${show(width)}×${show(height)}`);
  }
}

/** Throws on the first vertex whose (u, v) is not finite and near the content, or whose brightness or mask is outside [0, 1]. */
export function checkMeshValues(mesh: WarpMesh): WarpMesh {
  checkMeshSize(mesh.cols, mesh.rows, mesh.width, mesh.height);
  const n = mesh.cols * mesh.rows;
  for (const [name, a] of [['u', mesh.u], ['v', mesh.v], ['brightness', mesh.brightness], ['mask', mesh.mask]] as const) {
    if (a.length !== n) throw new Error(`Expected ${n} values of ${name} but received ${a.length}`);
  }
  for (let i = 0; i < n; i++) {
    const u = mesh.u[i];
    const v = mesh.v[i];
    if (!(Math.abs(u) <= MAX_UV && Math.abs(v) <= MAX_UV)) {
      throw new Error(`Expected finite fisheye (u, v) within ±${MAX_UV} at vertex ${i} but received (${show(u)}, ${show(v)})`);
    }
    const b = mesh.brightness[i];
    const m = mesh.mask[i];
    if (!(b >= 0 && b <= 1 && m >= 0 && m <= 1)) throw new Error(`Expected brightness and mask in [0, 1] at vertex ${i} but received ${show(b)} and ${show(m)}`);
  }
  return mesh;
}

function show(x: unknown): string {
  const s = typeof x === 'number' ? String(x) : (JSON.stringify(x) ?? String(x));
  return s.length > 24 ? s.slice(0, 23) + '…' : s;
}

/** How to read a grid stored as an image (PFM, PNG), which does not carry the projector resolution. */
export interface GridImageOptions {
  /** Projector resolution the grid spans; defaults to cols−1 × rows−1 (one unit per grid step). */
  width?: number;
  height?: number;
  meta?: Record<string, unknown>;
}

/** The empty mesh of an image with one pixel a vertex; throws, naming `what`, for one smaller than 2×2. */
export function meshForGridImage(img: { width: number; height: number }, what: string, o: GridImageOptions): WarpMesh {
  if (img.width < 2 || img.height < 2) throw new Error(`Expected ${what} of at least 2×2 but received ${img.width}×${img.height}`);
  return createMesh(img.width, img.height, o.width ?? img.width - 1, o.height ?? img.height - 1, o.meta ?? {});
}

/** As {@link checkMeshValues}, for an adaptive mesh of triangles; vertices inside the frame too. */
export function checkTriangleValues(mesh: TriangleWarpMesh): TriangleWarpMesh {
  const n = mesh.x.length;
  for (let i = 0; i < n; i++) {
    const x = mesh.x[i];
    const y = mesh.y[i];
    // float32 NDC turned back into pixels may stray by a rounding step past the frame's border
    const slack = 1e-3;
    if (!(x >= -slack && x <= mesh.width + slack && y >= -slack && y <= mesh.height + slack)) throw new Error(`Expected vertex ${i} inside the projector frame but it is at (${show(x)}, ${show(y)})`);
    if (!(Math.abs(mesh.u[i]) <= MAX_UV && Math.abs(mesh.v[i]) <= MAX_UV)) throw new Error(`Expected finite fisheye (u, v) within ±${MAX_UV} at vertex ${i} but received (${show(mesh.u[i])}, ${show(mesh.v[i])})`);
    const b = mesh.brightness[i];
    const m = mesh.mask[i];
    if (!(b >= 0 && b <= 1 && m >= 0 && m <= 1)) throw new Error(`Expected brightness and mask in [0, 1] at vertex ${i} but received ${show(b)} and ${show(m)}`);
  }
  return mesh;
}
