/**
 * glTF 2.0 binary (.glb), skyfold's native warp mesh (Khronos glTF 2.0 specification).
 *
 * One scene, one node, one mesh, one triangle primitive:
 * - POSITION   FLOAT VEC3: projector position in normalized device coordinates,
 *              x = 2·px/width − 1 (right), y = 1 − 2·py/height (up), z = 0.
 * - TEXCOORD_0 FLOAT VEC2: fisheye (u, v) as stored, u right, v down — glTF's UV origin is the
 *              top-left corner, which is our convention, so there is no flip.
 * - COLOR_0    FLOAT VEC4: (brightness, brightness, brightness, mask). Unlit points keep their u, v.
 * - indices: two triangles per grid cell, counter-clockwise seen from +z (front faces face a camera
 *   looking down −z); UNSIGNED_SHORT when every index fits, else UNSIGNED_INT.
 * - material: unlit (KHR_materials_unlit), double sided.
 * - root `extras`: mesh.meta plus `skyfoldMesh` {version, cols, rows, width, height}, from which the
 *   reader rebuilds the grid. Vertices are in grid order, the top row of the projector frame first.
 * - baked from an as-built dome (`dome.mesh`): a second mesh, `as-built-dome`, its triangles (POSITION
 *   in metres in the rig's world frame, z up), on a node outside the scene so a player never draws it;
 *   with the rig in extras it stands for the rig without the mesh file beside it.
 * - the adaptive mesh (bake --adaptive, warp-core mesh/adaptive.ts): the same, its vertices where the
 *   quadtree put them and its own triangles; extras.skyfoldMesh {version, layout: "triangles", width, height}.
 */
import { Document, Extension, NodeIO, type ReaderContext, type WriterContext } from '@gltf-transform/core';
import type { TriangleWarpMesh, WarpMesh } from '@skyfold/warp-core';
import { checkMeshSize, checkMeshValues, checkTriangleValues, MAX_GRID_SIDE } from './check.js';

/** Root-extras key holding the grid description; the rest of extras is mesh.meta. */
export const GLB_GRID_KEY = 'skyfoldMesh';
const GRID_VERSION = 1;

/** Marks every material unlit (KHR_materials_unlit has no properties of its own). */
class MaterialsUnlit extends Extension {
  static override EXTENSION_NAME = 'KHR_materials_unlit';
  override readonly extensionName = 'KHR_materials_unlit';
  read(_context: ReaderContext): this {
    return this;
  }
  write(context: WriterContext): this {
    for (const material of context.jsonDoc.json.materials ?? []) {
      material.extensions = { ...material.extensions, KHR_materials_unlit: {} };
    }
    return this;
  }
}

function createIO(): NodeIO {
  return new NodeIO().registerExtensions([MaterialsUnlit]);
}

/** Index list for the grid: cell (c, r) → (tl, bl, br), (tl, br, tr), counter-clockwise seen from +z. */
export function gridTriangles(cols: number, rows: number): Uint32Array {
  const out = new Uint32Array((cols - 1) * (rows - 1) * 6);
  let k = 0;
  for (let r = 0; r + 1 < rows; r++) {
    for (let c = 0; c + 1 < cols; c++) {
      const tl = r * cols + c;
      const tr = tl + 1;
      const bl = tl + cols;
      const br = bl + 1;
      out[k++] = tl;
      out[k++] = bl;
      out[k++] = br;
      out[k++] = tl;
      out[k++] = br;
      out[k++] = tr;
    }
  }
  return out;
}

/** The as-built dome's triangles, metres, world frame. */
export interface GlbDome {
  positions: ArrayLike<number>;
  indices: ArrayLike<number>;
}

/** Name of the glTF mesh (and node) holding an as-built dome's triangles. */
export const GLB_DOME_NAME = 'as-built-dome';

export async function writeGlb(mesh: WarpMesh, dome?: GlbDome): Promise<Uint8Array> {
  const { cols, rows, width, height } = mesh;
  const n = cols * rows;
  const position = new Float32Array(n * 3);
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const i = r * cols + c;
      position[i * 3] = (2 * c) / (cols - 1) - 1;
      position[i * 3 + 1] = 1 - (2 * r) / (rows - 1);
    }
  }
  return encodeWarpGlb(position, mesh, gridTriangles(cols, rows), { ...mesh.meta, [GLB_GRID_KEY]: { version: GRID_VERSION, cols, rows, width, height } }, dome);
}

/**
 * The adaptive mesh (warp-core mesh/adaptive.ts) as a .glb: the same attributes, material and extras
 * as the grid's, its vertices where the quadtree put them; root extras.skyfoldMesh says
 * `layout: "triangles"` with the projector resolution instead of a grid's cols and rows.
 */
export async function writeTriangleGlb(mesh: TriangleWarpMesh, dome?: GlbDome): Promise<Uint8Array> {
  const n = mesh.x.length;
  const position = new Float32Array(n * 3);
  for (let i = 0; i < n; i++) {
    position[i * 3] = (2 * mesh.x[i]) / mesh.width - 1;
    position[i * 3 + 1] = 1 - (2 * mesh.y[i]) / mesh.height;
  }
  const grid = { version: GRID_VERSION, layout: TRIANGLE_LAYOUT, width: mesh.width, height: mesh.height, vertices: n, triangles: mesh.indices.length / 3 };
  return encodeWarpGlb(position, mesh, mesh.indices, { ...mesh.meta, [GLB_GRID_KEY]: grid }, dome);
}

/** `layout` of extras.skyfoldMesh for a mesh of triangles (absent: the grid). */
export const TRIANGLE_LAYOUT = 'triangles';

async function encodeWarpGlb(
  position: Float32Array,
  fields: Pick<WarpMesh, 'u' | 'v' | 'brightness' | 'mask'>,
  triangles: Uint32Array,
  extras: Record<string, unknown>,
  dome: GlbDome | undefined,
): Promise<Uint8Array> {
  const n = position.length / 3;
  const texcoord = new Float32Array(n * 2);
  const color = new Float32Array(n * 4);
  for (let i = 0; i < n; i++) {
    texcoord[i * 2] = fields.u[i];
    texcoord[i * 2 + 1] = fields.v[i];
    color[i * 4] = color[i * 4 + 1] = color[i * 4 + 2] = fields.brightness[i];
    color[i * 4 + 3] = fields.mask[i];
  }
  // 65535 is the primitive-restart value, which glTF forbids as an index.
  const indices = n - 1 < 65535 ? Uint16Array.from(triangles) : triangles;

  const doc = new Document();
  doc.createExtension(MaterialsUnlit);
  doc.getRoot().getAsset().generator = 'skyfold';
  doc.getRoot().setExtras(extras);
  const buffer = doc.createBuffer();
  const material = doc.createMaterial('warp').setDoubleSided(true).setBaseColorFactor([1, 1, 1, 1]);
  const primitive = doc
    .createPrimitive()
    .setAttribute('POSITION', doc.createAccessor('position').setType('VEC3').setArray(position).setBuffer(buffer))
    .setAttribute('TEXCOORD_0', doc.createAccessor('fisheye').setType('VEC2').setArray(texcoord).setBuffer(buffer))
    .setAttribute('COLOR_0', doc.createAccessor('brightness-mask').setType('VEC4').setArray(color).setBuffer(buffer))
    .setIndices(doc.createAccessor('indices').setType('SCALAR').setArray(indices).setBuffer(buffer))
    .setMaterial(material);
  const node = doc.createNode('warp-mesh').setMesh(doc.createMesh('warp-mesh').addPrimitive(primitive));
  doc.getRoot().setDefaultScene(doc.createScene('skyfold').addChild(node));
  if (dome) {
    const material = doc.createMaterial(GLB_DOME_NAME).setDoubleSided(true);
    const prim = doc
      .createPrimitive()
      .setAttribute('POSITION', doc.createAccessor('dome-position').setType('VEC3').setArray(Float32Array.from(dome.positions)).setBuffer(buffer))
      .setIndices(doc.createAccessor('dome-indices').setType('SCALAR').setArray(Uint32Array.from(dome.indices)).setBuffer(buffer))
      .setMaterial(material);
    doc.createNode(GLB_DOME_NAME).setMesh(doc.createMesh(GLB_DOME_NAME).addPrimitive(prim));
  }
  return createIO().writeBinary(doc);
}

/** Reads either kind of skyfold .glb: the grid, or the adaptive mesh of triangles. */
export async function readAnyGlb(bytes: Uint8Array): Promise<{ grid: WarpMesh; triangles?: undefined } | { grid?: undefined; triangles: TriangleWarpMesh }> {
  const doc = await readDocument(bytes);
  const extras = doc.getRoot().getExtras() as Record<string, unknown>;
  const grid = extras[GLB_GRID_KEY] as { layout?: unknown } | undefined;
  if (grid && typeof grid === 'object' && grid.layout === TRIANGLE_LAYOUT) return { triangles: triangleMeshOf(doc) };
  return { grid: await readGlb(bytes) };
}

function triangleMeshOf(doc: Document): TriangleWarpMesh {
  const extras = { ...(doc.getRoot().getExtras() as Record<string, unknown>) };
  const t = extras[GLB_GRID_KEY] as { version?: unknown; width?: unknown; height?: unknown };
  if (t.version !== GRID_VERSION) throw new Error(`Expected skyfold warp mesh version ${GRID_VERSION} but received ${String(t.version)}`);
  if (!isPositive(t.width) || !isPositive(t.height)) throw new Error(`Expected extras.${GLB_GRID_KEY} with positive width and height`);
  checkMeshSize(2, 2, t.width, t.height);
  delete extras[GLB_GRID_KEY];
  const prim = warpPrimitive(doc);
  const n = prim.getAttribute('POSITION')?.getCount() ?? 0;
  if (n < 3 || n > MAX_TRIANGLE_VERTICES) throw new Error(`Expected 3 to ${MAX_TRIANGLE_VERTICES} vertices in the skyfold glb but received ${n}`);
  const position = floatAttribute(prim, 'POSITION', 3, n);
  const texcoord = floatAttribute(prim, 'TEXCOORD_0', 2, n);
  const color = floatAttribute(prim, 'COLOR_0', 4, n);
  const idx = prim.getIndices()?.getArray();
  if (!idx || idx.length % 3 !== 0 || idx.length === 0) throw new Error('Expected indexed triangles in the skyfold glb');
  const indices = Uint32Array.from(idx as ArrayLike<number>);
  for (const i of indices) if (i >= n) throw new Error(`Expected triangle indices below ${n} in the skyfold glb but received ${i}`);
  const { width, height } = t as { width: number; height: number };
  const mesh: TriangleWarpMesh = {
    width,
    height,
    x: Float32Array.from({ length: n }, (_, i) => ((position[i * 3] + 1) * width) / 2),
    y: Float32Array.from({ length: n }, (_, i) => ((1 - position[i * 3 + 1]) * height) / 2),
    u: Float32Array.from({ length: n }, (_, i) => texcoord[i * 2]),
    v: Float32Array.from({ length: n }, (_, i) => texcoord[i * 2 + 1]),
    brightness: Float32Array.from({ length: n }, (_, i) => color[i * 4]),
    mask: Float32Array.from({ length: n }, (_, i) => color[i * 4 + 3]),
    indices,
    meta: extras,
  };
  return checkTriangleValues(mesh);
}

/** Vertices of an adaptive mesh at most: one per pixel corner of the largest projector. */
const MAX_TRIANGLE_VERTICES = (MAX_GRID_SIDE * MAX_GRID_SIDE);

function warpPrimitive(doc: Document) {
  const primitives = doc.getRoot().listMeshes().filter((m) => m.getName() !== GLB_DOME_NAME).flatMap((m) => m.listPrimitives());
  if (primitives.length !== 1) throw new Error(`Expected one mesh primitive in the skyfold glb but found ${primitives.length}`);
  return primitives[0];
}

function floatAttribute(prim: ReturnType<typeof warpPrimitive>, name: string, size: number, n: number): Float32Array {
  const acc = prim.getAttribute(name);
  const arr = acc?.getArray();
  if (!acc || !(arr instanceof Float32Array) || acc.getElementSize() !== size || acc.getCount() !== n) {
    throw new Error(`Expected ${name} as ${n} float VEC${size} in the skyfold glb`);
  }
  return arr;
}

async function readDocument(bytes: Uint8Array): Promise<Document> {
  try {
    return await createIO().readBinary(bytes);
  } catch (err) {
    const why = String((err as Error)?.message ?? err).split('\n')[0];
    throw new Error(`Expected a glTF binary (.glb) warp mesh but could not read it: ${why.length > 120 ? why.slice(0, 119) + '…' : why}`);
  }
}

/** Reads a .glb written by {@link writeGlb}; throws a clear Error for any other glb. */
export async function readGlb(bytes: Uint8Array): Promise<WarpMesh> {
  let doc: Document;
  try {
    doc = await createIO().readBinary(bytes);
  } catch (err) {
    const why = String((err as Error)?.message ?? err).split('\n')[0];
    throw new Error(`Expected a glTF binary (.glb) warp mesh but could not read it: ${why.length > 120 ? why.slice(0, 119) + '…' : why}`);
  }
  const extras = { ...(doc.getRoot().getExtras() as Record<string, unknown>) };
  const grid = extras[GLB_GRID_KEY] as { version?: unknown; cols?: unknown; rows?: unknown; width?: unknown; height?: unknown } | undefined;
  if (!grid || typeof grid !== 'object') throw new Error(`Expected a skyfold warp mesh glb (root extras.${GLB_GRID_KEY}) but found none`);
  if (grid.version !== GRID_VERSION) throw new Error(`Expected skyfold warp mesh version ${GRID_VERSION} but received ${String(grid.version)}`);
  if ((grid as { layout?: unknown }).layout === TRIANGLE_LAYOUT) throw new Error('Expected a grid warp mesh but this .glb holds an adaptive mesh of triangles');
  const { cols, rows, width, height } = grid;
  if (!isInt2(cols) || !isInt2(rows) || !isPositive(width) || !isPositive(height)) {
    throw new Error(`Expected extras.${GLB_GRID_KEY} with integer cols, rows ≥ 2 and positive width, height`);
  }
  checkMeshSize(cols, rows, width, height);
  delete extras[GLB_GRID_KEY];

  const primitives = doc.getRoot().listMeshes().filter((m) => m.getName() !== GLB_DOME_NAME).flatMap((m) => m.listPrimitives());
  if (primitives.length !== 1) throw new Error(`Expected one mesh primitive in the skyfold glb but found ${primitives.length}`);
  const prim = primitives[0];
  const n = cols * rows;
  const attr = (name: string, size: number): Float32Array => {
    const acc = prim.getAttribute(name);
    const arr = acc?.getArray();
    if (!acc || !(arr instanceof Float32Array) || acc.getElementSize() !== size || acc.getCount() !== n) {
      throw new Error(`Expected ${name} as ${n} float VEC${size} in the skyfold glb`);
    }
    return arr;
  };
  const position = attr('POSITION', 3);
  const texcoord = attr('TEXCOORD_0', 2);
  const color = attr('COLOR_0', 4);
  const mesh: WarpMesh = { cols, rows, width, height, u: new Float32Array(n), v: new Float32Array(n), brightness: new Float32Array(n), mask: new Float32Array(n), meta: extras };
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < cols; c++) {
      const i = r * cols + c;
      const dx = position[i * 3] - ((2 * c) / (cols - 1) - 1);
      const dy = position[i * 3 + 1] - (1 - (2 * r) / (rows - 1));
      if (Math.abs(dx) > 1e-5 || Math.abs(dy) > 1e-5) throw new Error(`Expected vertex ${i} of the skyfold glb at grid column ${c}, row ${r} but it is elsewhere`);
      mesh.u[i] = texcoord[i * 2];
      mesh.v[i] = texcoord[i * 2 + 1];
      mesh.brightness[i] = color[i * 4];
      mesh.mask[i] = color[i * 4 + 3];
    }
  }
  return checkMeshValues(mesh);
}

function isInt2(x: unknown): x is number {
  return typeof x === 'number' && Number.isInteger(x) && x >= 2;
}
function isPositive(x: unknown): x is number {
  return typeof x === 'number' && Number.isFinite(x) && x > 0;
}
